import 'server-only';
import { asc, eq, gt } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { auditChainHead, auditEntries } from '../../db/schema';
import type { RecordType } from '../records/types';
import {
  type ChainBreak,
  type FieldChange,
  auditEntryHash,
  canonicalJson,
  findChainBreak,
  genesisHash,
  sqlUtc,
} from './hash';

export { diffFields, type FieldChange } from './hash';

/*
 * The audit trail (21 CFR 11.10(e)): every change to a GMP record calls writeAudit inside the
 * transaction that makes the change. Appends are serialised by locking the chain head row, so the
 * chain never forks under concurrent writes.
 */

export interface AuditActor {
  id: number | null;
  name: string;
}

export interface AuditInput {
  actor: AuditActor;
  recordType: RecordType;
  recordId: number;
  action: string;
  changes?: FieldChange[];
  reason?: string | null;
}

export function writeAudit(tx: DbOrTx, input: AuditInput): Promise<{ id: number; hash: string }> {
  return appendAudit(tx, input, new Date());
}

/**
 * For the demo scenario only (db/seed): its stories happened over months, and their audit entries
 * carry the dates of those events so the demo reads like a working site. The application never
 * calls this; tests/unit/audit/backdating.test.ts keeps it that way.
 */
export function writeDemoAuditAt(tx: DbOrTx, input: AuditInput, at: Date): Promise<{ id: number; hash: string }> {
  return appendAudit(tx, input, at);
}

async function appendAudit(tx: DbOrTx, input: AuditInput, at: Date): Promise<{ id: number; hash: string }> {
  await tx.insert(auditChainHead).ignore().values({ id: 1, lastEntryId: 0, lastHash: genesisHash });
  const [head] = await tx.select().from(auditChainHead).where(eq(auditChainHead.id, 1)).for('update');
  if (!head) throw new Error('audit chain head missing');

  const content = {
    at: sqlUtc(at),
    userId: input.actor.id,
    userName: input.actor.name,
    recordType: input.recordType,
    recordId: input.recordId,
    action: input.action,
    changes: canonicalJson(input.changes ?? []),
    reason: input.reason ?? null,
  };
  const hash = auditEntryHash(head.lastHash, content);
  const [inserted] = await tx
    .insert(auditEntries)
    .values({ ...content, prevHash: head.lastHash, hash })
    .$returningId();
  await tx.update(auditChainHead).set({ lastEntryId: inserted!.id, lastHash: hash }).where(eq(auditChainHead.id, 1));
  return { id: inserted!.id, hash };
}

export type ChainReport = { ok: true; entries: number } | ({ ok: false; entries: number } & ChainBreak);

/** Walks the whole chain in id order, a page at a time, and reports the first broken link. */
export async function verifyAuditChain(db: DbOrTx, pageSize = 2000): Promise<ChainReport> {
  let lastId = 0;
  let lastHash = genesisHash;
  let count = 0;
  for (;;) {
    const rows = await db
      .select()
      .from(auditEntries)
      .where(gt(auditEntries.id, lastId))
      .orderBy(asc(auditEntries.id))
      .limit(pageSize);
    if (rows.length === 0) break;
    const result = findChainBreak(rows, lastHash);
    if ('problem' in result) return { ok: false, entries: count, ...result };
    lastHash = result.lastHash;
    lastId = rows[rows.length - 1]!.id;
    count += rows.length;
  }
  const [head] = await db.select().from(auditChainHead).where(eq(auditChainHead.id, 1));
  if (head && (head.lastEntryId !== lastId || head.lastHash !== lastHash)) {
    return {
      ok: false,
      entries: count,
      id: head.lastEntryId,
      problem: 'the newest entries are missing (the chain ends before the last entry written)',
    };
  }
  return { ok: true, entries: count };
}
