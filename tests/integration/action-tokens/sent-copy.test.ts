import { randomBytes } from 'node:crypto';
import { and, eq, inArray, lt, ne, sql } from 'drizzle-orm';
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
    // The worker sends in id order, and earlier test files leave thousands of messages queued: they
    // are parked a century ahead while this one is sent, then put back as they were.
    const [mine] = await db.select({ id: mailOutbox.id }).from(mailOutbox).where(eq(mailOutbox.dedupeKey, key));
    const parked = (
      await db
        .select({ id: mailOutbox.id })
        .from(mailOutbox)
        .where(and(eq(mailOutbox.status, 'pending'), lt(mailOutbox.id, mine!.id)))
    ).map((r) => r.id);
    const shift = (years: number) =>
      parked.length === 0
        ? Promise.resolve()
        : db
            .update(mailOutbox)
            .set({ nextAttemptAt: sql`${mailOutbox.nextAttemptAt} + INTERVAL ${years} YEAR` })
            .where(inArray(mailOutbox.id, parked));
    await shift(100);
    try {
      // Should anything else have tried it and failed meanwhile, it is made due again.
      for (let round = 0; round < 20; round++) {
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
    } finally {
      await shift(-100);
    }
    const [row] = await db.select().from(mailOutbox).where(eq(mailOutbox.dedupeKey, key));
    expect({ status: row!.status, attempts: row!.attempts, lastError: row!.lastError }).toMatchObject({ status: 'sent' });
    expect(delivered.some((d) => d.includes(token))).toBe(true);
    expect(row!.textBody).not.toContain(token);
    expect(row!.htmlBody).not.toContain(token);
    expect(row!.textBody).toContain(`/review/${redactedTokenText}`);
  });
});
