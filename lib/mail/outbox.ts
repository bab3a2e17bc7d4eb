import 'server-only';
import { randomUUID } from 'node:crypto';
import { eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import type { DbOrTx } from '../../db/client';
import { mailOutbox } from '../../db/schema';
import { getEnv } from '../env';
import type { RecordType } from '../records/types';

/*
 * The transactional outbox: a notification is queued in the same transaction as the event that
 * causes it, so it is sent if and only if the event commits. The worker (lib/mail/worker.ts) sends
 * it later, with retries.
 */

export interface OutgoingMail {
  /** Names the notification, e.g. "overdue:DEV-2026-0042:2026-12-02"; queueing the same key twice is a no-op. */
  dedupeKey: string;
  template: string;
  to: { address: string; userId?: number | null };
  subject: string;
  text: string;
  html: string;
  recordType?: RecordType | null;
  recordId?: number | null;
}

/*
 * INSERT IGNORE would quietly truncate an over-long value or drop a row with a bad user id, so the
 * lengths are checked here and a skipped insert is confirmed to be a duplicate below.
 */
const textColumn = z.string().refine((s) => Buffer.byteLength(s, 'utf8') <= 65_535, 'is longer than a TEXT column holds (64 KiB)');

const outgoingMailSchema = z.object({
  dedupeKey: z.string().min(1).max(191),
  template: z.string().min(1).max(48),
  to: z.object({ address: z.email().max(254), userId: z.number().int().positive().nullish() }),
  subject: z.string().min(1).max(255),
  text: textColumn,
  html: textColumn,
  recordType: z.string().max(32).nullish(),
  recordId: z.number().int().nullish(),
});

/** The domain part of MAIL_FROM, used on the right of generated Message-IDs. */
export function messageIdDomain(mailFrom: string): string {
  const match = /@([A-Za-z0-9.-]+)>?\s*$/.exec(mailFrom.trim());
  return match?.[1]?.toLowerCase() ?? 'plumbline.invalid';
}

/**
 * Queues a message inside the caller's transaction. Returns queued: false when a message with the
 * same dedupeKey already exists (sent or not); then nothing is written.
 */
export async function enqueueMail(tx: DbOrTx, input: OutgoingMail): Promise<{ queued: boolean; messageId: string }> {
  const mail = outgoingMailSchema.parse(input);
  // Fixed at enqueue time and reused on every retry, so a relay can drop a resend after a crash.
  const messageId = `<${randomUUID()}@${messageIdDomain(getEnv().MAIL_FROM)}>`;
  const [result] = await tx
    .insert(mailOutbox)
    .ignore()
    .values({
      dedupeKey: mail.dedupeKey,
      template: mail.template,
      toAddress: mail.to.address,
      toUserId: mail.to.userId ?? null,
      subject: mail.subject,
      textBody: mail.text,
      htmlBody: mail.html,
      recordType: mail.recordType ?? null,
      recordId: mail.recordId ?? null,
      // The database clock, like the worker's: app servers and workers may disagree about the time.
      nextAttemptAt: sql`UTC_TIMESTAMP(3)`,
      messageId,
    });
  if (result.affectedRows === 1) return { queued: true, messageId };

  const [existing] = await tx
    .select({ messageId: mailOutbox.messageId })
    .from(mailOutbox)
    .where(eq(mailOutbox.dedupeKey, mail.dedupeKey));
  if (!existing) throw new Error(`mail "${mail.dedupeKey}" was not queued (the insert was refused, e.g. an unknown user id)`);
  return { queued: false, messageId: existing.messageId };
}
