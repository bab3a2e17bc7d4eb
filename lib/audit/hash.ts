import { createHash } from 'node:crypto';

/*
 * The audit hash chain. Each entry's hash is SHA-256 over the previous entry's hash and the
 * entry's own canonical content, so changing, removing or reordering any row breaks every link
 * after it. Pure: no I/O.
 */

export const genesisHash = '0'.repeat(64);

export interface FieldChange {
  field: string;
  from: unknown;
  to: unknown;
}

export interface AuditContent {
  at: string;
  userId: number | null;
  userName: string;
  recordType: string;
  recordId: number;
  action: string;
  /** Canonical JSON of the field changes, exactly as stored. */
  changes: string;
  reason: string | null;
}

/** JSON with object keys sorted at every depth, so equal content always gives equal text. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(value: unknown): unknown {
  if (value instanceof Date) return value.toISOString();
  if (Array.isArray(value)) return value.map(sortKeys);
  if (value && typeof value === 'object') {
    return Object.fromEntries(
      Object.keys(value as object)
        .sort()
        .map((k) => [k, sortKeys((value as Record<string, unknown>)[k])]),
    );
  }
  return value === undefined ? null : value;
}

export function sha256Hex(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

export function auditEntryHash(prevHash: string, content: AuditContent): string {
  return sha256Hex(`${prevHash}\n${canonicalJson(content)}`);
}

export interface ChainRow extends AuditContent {
  id: number;
  prevHash: string;
  hash: string;
}

export type ChainBreak = { id: number; problem: string };

/**
 * Walks rows in id order from a known starting hash and returns the first broken link, or null.
 * Callers feed it page by page, carrying `lastHash` between pages.
 */
export function findChainBreak(rows: readonly ChainRow[], startHash: string): ChainBreak | { lastHash: string } {
  let expectedPrev = startHash;
  for (const row of rows) {
    if (row.prevHash !== expectedPrev) {
      return { id: row.id, problem: 'does not follow the entry before it (an entry was removed, reordered or changed)' };
    }
    const { id: _id, prevHash: _p, hash: _h, ...content } = row;
    if (auditEntryHash(row.prevHash, content) !== row.hash) {
      return { id: row.id, problem: 'content does not match its hash (the entry was changed after it was written)' };
    }
    expectedPrev = row.hash;
  }
  return { lastHash: expectedPrev };
}

/** The changes between two versions of a record, field by field; unchanged fields are left out. */
export function diffFields(
  before: Record<string, unknown> | null,
  after: Record<string, unknown>,
  fields: readonly string[] = Object.keys(after),
): FieldChange[] {
  const norm = (v: unknown) => canonicalJson(v ?? null);
  return fields
    .filter((f) => norm(before?.[f]) !== norm(after[f]))
    .map((f) => ({ field: f, from: before?.[f] ?? null, to: after[f] ?? null }));
}

/** UTC timestamp with milliseconds, in the text form MariaDB DATETIME(3) stores and returns. */
export function sqlUtc(date: Date): string {
  return date.toISOString().replace('T', ' ').replace('Z', '');
}
