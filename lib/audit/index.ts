import 'server-only';
import { asc, eq, gt } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { auditChainHead, auditEntries } from '../../db/schema';
import { now } from '../clock';
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
 *
 * The head is the one row every writer queues on, so it is taken as late and as briefly as
 * possible: inside a transaction opened by the write path (lib/records/transaction.ts) the entries
 * wait in memory and are chained in one go just before commit, after every record row, counter and
 * child row the transaction needed. So the head is always the last lock a writer takes, and two
 * writers can never hold it and each want something the other holds.
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

const deferred = new WeakMap<object, AuditInput[]>();

/** For lib/records/transaction.ts: entries written in `tx` wait for flushDeferredAudit. */
export function deferAudit(tx: DbOrTx): void {
  deferred.set(tx, []);
}

/** Chains the entries `tx` deferred; the write path calls it as the last statement before commit. */
export async function flushDeferredAudit(tx: DbOrTx): Promise<void> {
  const entries = deferred.get(tx);
  deferred.delete(tx);
  if (entries && entries.length > 0) await appendAudit(tx, entries, now());
}

export async function writeAudit(tx: DbOrTx, input: AuditInput): Promise<void> {
  const queue = deferred.get(tx);
  if (queue) {
    queue.push(input);
    return;
  }
  await appendAudit(tx, [input], now());
}

async function lockHead(tx: DbOrTx) {
  const read = () => tx.select().from(auditChainHead).where(eq(auditChainHead.id, 1)).for('update');
  const [head] = await read();
  if (head) return head;
  // Only on a database whose migration did not create the head (migration 0009 does). An INSERT
  // IGNORE on every append would take a shared lock first and deadlock concurrent writers.
  await tx.insert(auditChainHead).ignore().values({ id: 1, lastEntryId: 0, lastHash: genesisHash });
  const [created] = await read();
  if (!created) throw new Error('audit chain head missing');
  return created;
}

async function appendAudit(tx: DbOrTx, inputs: readonly AuditInput[], at: Date): Promise<void> {
  const head = await lockHead(tx);
  let prevHash = head.lastHash;
  let lastId = head.lastEntryId;
  for (const input of inputs) {
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
    const hash = auditEntryHash(prevHash, content);
    const [inserted] = await tx
      .insert(auditEntries)
      .values({ ...content, prevHash, hash })
      .$returningId();
    prevHash = hash;
    lastId = inserted!.id;
  }
  await tx.update(auditChainHead).set({ lastEntryId: lastId, lastHash: prevHash }).where(eq(auditChainHead.id, 1));
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
