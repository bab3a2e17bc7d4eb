import { randomBytes } from 'node:crypto';
import { and, eq, ne, sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '@/db/client';
import { mailOutbox } from '@/db/schema';
import { redactedTokenText } from '@/lib/action-tokens/redact';
import { enqueueMail } from '@/lib/mail/outbox';
import { runOutboxOnce } from '@/lib/mail/worker';

/*
 * A one-time link leaves the database once its message is sent: the reviewer's mailbox holds the
 * only usable copy (OWASP guidance for one-time URL tokens, from memory; issue 5: tokens never logged).
 */

describe('a sent message with a one-time link', () => {
  it('is delivered with the token and kept on record without it', async () => {
    const token = randomBytes(32).toString('base64url');
    const link = `http://localhost:3000/review/${token}`;
    const key = `it-redact-${randomBytes(6).toString('hex')}`;
    await enqueueMail(db, {
      dedupeKey: key,
      template: 'capa_effectiveness_review',
      to: { address: 'approver@brackwater.example' },
      subject: 'Review',
      text: `Open ${link}`,
      html: `<a href="${link}">Open</a>`,
    });
    const delivered: string[] = [];
    // Older queued messages go first; rounds continue until this one is sent (the rest are sent too,
    // and ignored here). Should anything else have tried it and failed, it is made due again.
    for (let round = 0; round < 100; round++) {
      await runOutboxOnce({
        workerId: `it-redact-${process.pid}`,
        batchSize: 50,
        transport: { sendMail: async (m) => void delivered.push(`${String(m.text)}\n${String(m.html)}`) },
      });
      const [state] = await db.select({ status: mailOutbox.status }).from(mailOutbox).where(eq(mailOutbox.dedupeKey, key));
      if (state?.status === 'sent') break;
      await db
        .update(mailOutbox)
        .set({ status: 'pending', claimedBy: null, nextAttemptAt: sql`UTC_TIMESTAMP(3) - INTERVAL 1 SECOND` })
        .where(and(eq(mailOutbox.dedupeKey, key), ne(mailOutbox.status, 'sent')));
    }
    const [row] = await db.select().from(mailOutbox).where(eq(mailOutbox.dedupeKey, key));
    expect({ status: row!.status, attempts: row!.attempts, lastError: row!.lastError }).toMatchObject({ status: 'sent' });
    expect(delivered.some((d) => d.includes(token))).toBe(true);
    expect(row!.textBody).not.toContain(token);
    expect(row!.htmlBody).not.toContain(token);
    expect(row!.textBody).toContain(`/review/${redactedTokenText}`);
  });
});
