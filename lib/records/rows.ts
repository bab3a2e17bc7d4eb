import 'server-only';
import { type InferSelectModel, type SQL, asc, eq } from 'drizzle-orm';
import type { MySqlTable } from 'drizzle-orm/mysql-core';
import type { DbOrTx, Tx } from '../../db/client';
import { diffFields, writeAudit } from '../audit';
import type { AnyRecordKind, InsertOf, RecordTable, RowOf } from './kind';

/*
 * The write path's row-level pieces that need nothing of signatures: reading a record's row (locked
 * or not), changes one record's event causes on another, and rows a rule reads across records. Kept
 * apart from write-path.ts so that lib/auth (which the signatures use to check a password) can
 * record sign-in bookkeeping through them without an import cycle.
 */

export async function readRow<K extends AnyRecordKind>(dbOrTx: DbOrTx, kind: K, id: number, lock: boolean): Promise<RowOf<K> | undefined> {
  const query = dbOrTx
    .select()
    .from(kind.table as MySqlTable)
    .where(eq(kind.table.id, id));
  const rows = lock ? await query.for('update') : await query;
  return rows[0] as RowOf<K> | undefined;
}

/**
 * A change that another record's event causes (a batch put on hold by a deviation, released by its
 * approval): locked, versioned and audited here, inside the causing transaction. The causing event
 * was checked; this record's own rules are not asked again. Returns false when nothing changed.
 */
export async function writeConsequence<K extends AnyRecordKind>(
  tx: Tx,
  kind: K,
  id: number,
  req: {
    actor: { id: number | null; name: string };
    action: string;
    reason: string | null;
    changes: (row: RowOf<K>) => Partial<InsertOf<K>> | null;
    /** False for bookkeeping no form edits (a sign-in's failure count): other people's open forms stay current. */
    bumpsVersion?: boolean;
  },
): Promise<boolean> {
  const before = await readRow(tx, kind, id, true);
  if (!before) return false;
  const changes = req.changes(before) as Record<string, unknown> | null;
  if (!changes || Object.keys(changes).length === 0) return false;
  const table = kind.table;
  await tx
    .update(table as MySqlTable)
    .set({ ...changes, ...(req.bumpsVersion === false ? {} : { version: Number(before.version) + 1 }) })
    .where(eq(table.id, id));
  const after = (await readRow(tx, kind, id, false))!;
  await writeAudit(tx, {
    actor: { id: req.actor.id, name: req.actor.name },
    recordType: kind.recordType,
    recordId: id,
    action: req.action,
    changes: diffFields(before, after, [...('status' in kind.table ? ['status'] : []), ...kind.auditFields]),
    reason: req.reason,
  });
  return true;
}

/**
 * Locks other rows of a table a rule reads across records (every active administrator, before one
 * is demoted), in id order so concurrent writers queue instead of deadlocking. Call it from an
 * edit's `apply`, inside the write path's transaction, after the record's own lock.
 */
export async function lockRowsInOrder<T extends RecordTable>(tx: Tx, table: T, where: SQL | undefined): Promise<InferSelectModel<T>[]> {
  return (await tx
    .select()
    .from(table as MySqlTable)
    .where(where)
    .orderBy(asc(table.id))
    .for('update')) as InferSelectModel<T>[];
}

