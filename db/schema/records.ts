import {
  bigint,
  char,
  datetime,
  index,
  int,
  mysqlTable,
  primaryKey,
  smallint,
  text,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';
import { users } from './users';
import { createdAt, id, utc } from './columns';

/*
 * Machinery every record type shares. A record is addressed by (record_type, record_id), where
 * record_type is one of lib/records/types.ts (deviation, capa, complaint, filling_ring, user, ...).
 */

/** Gap-free human numbers: one row per prefix and year, bumped inside the creating transaction. */
export const recordCounters = mysqlTable(
  'record_counters',
  {
    prefix: varchar('prefix', { length: 8 }).notNull(),
    year: smallint('year').notNull(),
    lastValue: int('last_value').notNull(),
  },
  (t) => [primaryKey({ columns: [t.prefix, t.year] })],
);

/** Append-only history of lifecycle transitions. */
export const stateHistory = mysqlTable(
  'state_history',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    recordType: varchar('record_type', { length: 32 }).notNull(),
    recordId: int('record_id').notNull(),
    event: varchar('event', { length: 48 }).notNull(),
    fromState: varchar('from_state', { length: 32 }),
    toState: varchar('to_state', { length: 32 }).notNull(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id),
    comment: text('comment'),
    at: utc('at').notNull(),
  },
  (t) => [index('state_history_record_idx').on(t.recordType, t.recordId, t.id)],
);

export const comments = mysqlTable(
  'comments',
  {
    id: id(),
    recordType: varchar('record_type', { length: 32 }).notNull(),
    recordId: int('record_id').notNull(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id),
    body: text('body').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('comments_record_idx').on(t.recordType, t.recordId, t.id)],
);

export const attachments = mysqlTable(
  'attachments',
  {
    id: id(),
    recordType: varchar('record_type', { length: 32 }).notNull(),
    recordId: int('record_id').notNull(),
    objectKey: varchar('object_key', { length: 255 }).notNull(),
    fileName: varchar('file_name', { length: 255 }).notNull(),
    contentType: varchar('content_type', { length: 127 }).notNull(),
    sizeBytes: bigint('size_bytes', { mode: 'number' }).notNull(),
    sha256: char('sha256', { length: 64 }).notNull(),
    uploadedBy: int('uploaded_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [
    index('attachments_record_idx').on(t.recordType, t.recordId),
    uniqueIndex('attachments_object_key_uq').on(t.objectKey),
  ],
);

export const recordLinks = mysqlTable(
  'record_links',
  {
    id: id(),
    fromType: varchar('from_type', { length: 32 }).notNull(),
    fromId: int('from_id').notNull(),
    toType: varchar('to_type', { length: 32 }).notNull(),
    toId: int('to_id').notNull(),
    /** e.g. "raised_capa", "related", "duplicate_of". */
    relation: varchar('relation', { length: 32 }).notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex('record_links_uq').on(t.fromType, t.fromId, t.toType, t.toId, t.relation),
    index('record_links_to_idx').on(t.toType, t.toId),
  ],
);

/*
 * Audit trail (21 CFR 11.10(e)). The application's database user holds INSERT and SELECT here and
 * nothing else (db/grants.ts). Each row carries the hash of the row before it, so any edit made
 * around the application breaks the chain that lib/audit/verify walks.
 */
export const auditEntries = mysqlTable(
  'audit_entries',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    /** Server UTC time with milliseconds, stored as the exact text that was hashed. */
    at: datetime('at', { mode: 'string', fsp: 3 }).notNull(),
    userId: int('user_id'),
    /** The user's printed name at the time, so the entry reads on its own. */
    userName: varchar('user_name', { length: 120 }).notNull(),
    recordType: varchar('record_type', { length: 32 }).notNull(),
    recordId: int('record_id').notNull(),
    action: varchar('action', { length: 64 }).notNull(),
    /** Canonical JSON of [{ field, from, to }], exactly as hashed. */
    changes: text('changes').notNull(),
    reason: text('reason'),
    prevHash: char('prev_hash', { length: 64 }).notNull(),
    hash: char('hash', { length: 64 }).notNull(),
  },
  (t) => [
    index('audit_entries_record_idx').on(t.recordType, t.recordId, t.id),
    index('audit_entries_user_idx').on(t.userId, t.id),
  ],
);

/** Serialises appends to the audit chain: one row, locked FOR UPDATE by every append. */
export const auditChainHead = mysqlTable('audit_chain_head', {
  id: int('id').primaryKey(),
  lastEntryId: bigint('last_entry_id', { mode: 'number' }).notNull(),
  lastHash: char('last_hash', { length: 64 }).notNull(),
});

/*
 * Electronic signatures (21 CFR 11.50, 11.70). Append-only like the audit trail. content_hash is
 * the SHA-256 of the record content that was signed; a record whose content hash no longer
 * matches shows the signature as not matching.
 */
export const signatures = mysqlTable(
  'signatures',
  {
    id: id(),
    recordType: varchar('record_type', { length: 32 }).notNull(),
    recordId: int('record_id').notNull(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id),
    printedName: varchar('printed_name', { length: 120 }).notNull(),
    printedTitle: varchar('printed_title', { length: 120 }).notNull(),
    meaning: varchar('meaning', { length: 48 }).notNull(),
    signedAt: datetime('signed_at', { mode: 'string', fsp: 3 }).notNull(),
    recordVersion: int('record_version').notNull(),
    contentHash: char('content_hash', { length: 64 }).notNull(),
    /** Canonical JSON { part: SHA-256 } of each part of the signed content, so a mismatch can say what changed. */
    contentParts: text('content_parts'),
    /** Hash of (signer, meaning, time, content hash): links the manifestation to the signed content. */
    signatureHash: char('signature_hash', { length: 64 }).notNull(),
  },
  (t) => [index('signatures_record_idx').on(t.recordType, t.recordId, t.id)],
);
