import 'server-only';
import { eq } from 'drizzle-orm';
import type { MySqlTable } from 'drizzle-orm/mysql-core';
import type { Tx } from '../../db/client';
import { type AuditActor, type FieldChange, writeAudit } from '../audit';
import type { AnyRecordKind } from './kind';

/*
 * Something that happened to a record without changing any of its columns, but that the audit
 * trail must still show: a password attempt refused because the account is locked (21 CFR
 * 11.300(d) asks for attempted use to be detected and reported). Like writeConsequence, it runs
 * inside the causing transaction, which has locked the row and checked what caused it; this
 * only adds the entry, chained with the rest of the transaction's entries before commit.
 */

export interface RecordNote {
  actor: AuditActor;
  action: string;
  reason?: string | null;
  /** Changes elsewhere that the entry should name; usually none. */
  changes?: FieldChange[];
}

/** Returns false, writing nothing, when the record does not exist. */
export async function noteOnRecord(tx: Tx, kind: AnyRecordKind, id: number, note: RecordNote): Promise<boolean> {
  const [row] = await tx
    .select({ id: kind.table.id })
    .from(kind.table as MySqlTable)
    .where(eq(kind.table.id, id));
  if (!row) return false;
  await writeAudit(tx, {
    actor: note.actor,
    recordType: kind.recordType,
    recordId: id,
    action: note.action,
    changes: note.changes ?? [],
    reason: note.reason ?? null,
  });
  return true;
}
