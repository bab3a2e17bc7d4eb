import { bigint, char, index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from 'drizzle-orm/mysql-core';
import { users } from './users';
import { createdAt, id, utc } from './columns';

/*
 * Transactional outbox: a notification is a row written in the same transaction as the event that
 * causes it; workers claim rows with SELECT ... FOR UPDATE SKIP LOCKED and send them.
 */
export const mailOutbox = mysqlTable(
  'mail_outbox',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    /** Stops the same notification being queued twice (e.g. "overdue:DEV-2026-0042:2026-12-02"). */
    dedupeKey: varchar('dedupe_key', { length: 191 }).notNull(),
    template: varchar('template', { length: 48 }).notNull(),
    toAddress: varchar('to_address', { length: 254 }).notNull(),
    toUserId: int('to_user_id').references(() => users.id),
    subject: varchar('subject', { length: 255 }).notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body').notNull(),
    recordType: varchar('record_type', { length: 32 }),
    recordId: int('record_id'),
    status: mysqlEnum('status', ['pending', 'sending', 'sent', 'failed']).notNull().default('pending'),
    attempts: int('attempts').notNull().default(0),
    nextAttemptAt: utc('next_attempt_at').notNull(),
    claimedBy: varchar('claimed_by', { length: 64 }),
    claimedAt: utc('claimed_at'),
    sentAt: utc('sent_at'),
    /** Message-ID given to SMTP; a retry after a crash reuses it so the relay can drop the duplicate. */
    messageId: varchar('message_id', { length: 191 }).notNull(),
    lastError: varchar('last_error', { length: 1000 }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('mail_outbox_dedupe_uq').on(t.dedupeKey),
    index('mail_outbox_due_idx').on(t.status, t.nextAttemptAt),
  ],
);

export const mailAttempts = mysqlTable(
  'mail_attempts',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    outboxId: bigint('outbox_id', { mode: 'number' })
      .notNull()
      .references(() => mailOutbox.id),
    worker: varchar('worker', { length: 64 }).notNull(),
    startedAt: utc('started_at').notNull(),
    finishedAt: utc('finished_at'),
    outcome: mysqlEnum('outcome', ['started', 'sent', 'failed']).notNull(),
    error: varchar('error', { length: 1000 }),
  },
  (t) => [index('mail_attempts_outbox_idx').on(t.outboxId)],
);

/*
 * One-time action tokens for links in e-mail. Only the SHA-256 of the token is stored; a token is
 * bound to one user, one record, one action and the record version it was issued for.
 */
export const actionTokens = mysqlTable(
  'action_tokens',
  {
    id: id(),
    tokenHash: char('token_hash', { length: 64 }).notNull(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id),
    recordType: varchar('record_type', { length: 32 }).notNull(),
    recordId: int('record_id').notNull(),
    action: varchar('action', { length: 48 }).notNull(),
    recordVersion: int('record_version').notNull(),
    expiresAt: utc('expires_at').notNull(),
    usedAt: utc('used_at'),
    revokedAt: utc('revoked_at'),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('action_tokens_hash_uq').on(t.tokenHash),
    index('action_tokens_record_idx').on(t.recordType, t.recordId),
  ],
);
