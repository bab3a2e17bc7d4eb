import 'server-only';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { attachments, auditEntries, signatures, stateHistory } from '../../db/schema';
import type { RecordType } from './types';

/*
 * Facts about a record that its kind's rules read from the record's own trail: the files attached
 * to it (a signature covers their SHA-256), who signed it and with what meaning, who sent which
 * event, who made which edit. Read inside the write path's transaction, under the record's lock.
 */

export interface EvidenceDigest {
  id: number;
  fileName: string;
  sha256: string;
}

/** Every file on the record, oldest first (files are never removed). */
export async function listEvidenceDigests(dbOrTx: DbOrTx, recordType: RecordType, recordId: number): Promise<EvidenceDigest[]> {
  return dbOrTx
    .select({ id: attachments.id, fileName: attachments.fileName, sha256: attachments.sha256 })
    .from(attachments)
    .where(and(eq(attachments.recordType, recordType), eq(attachments.recordId, recordId)))
    .orderBy(asc(attachments.id));
}

export interface SignerFact {
  userId: number;
  meaning: string;
}

export async function listSigners(dbOrTx: DbOrTx, recordType: RecordType, recordId: number): Promise<SignerFact[]> {
  return dbOrTx
    .select({ userId: signatures.userId, meaning: signatures.meaning })
    .from(signatures)
    .where(and(eq(signatures.recordType, recordType), eq(signatures.recordId, recordId)))
    .orderBy(asc(signatures.id));
}

/** Who sent `event` to the record most recently, or null. */
export async function lastSenderOf(dbOrTx: DbOrTx, recordType: RecordType, recordId: number, event: string): Promise<number | null> {
  const [row] = await dbOrTx
    .select({ userId: stateHistory.userId })
    .from(stateHistory)
    .where(and(eq(stateHistory.recordType, recordType), eq(stateHistory.recordId, recordId), eq(stateHistory.event, event)))
    .orderBy(desc(stateHistory.id))
    .limit(1);
  return row?.userId ?? null;
}

/** Everyone who made one of these edits on the record (audit actions), each once. */
export async function editorsOf(dbOrTx: DbOrTx, recordType: RecordType, recordId: number, actions: readonly string[]): Promise<number[]> {
  const rows = await dbOrTx
    .selectDistinct({ userId: auditEntries.userId })
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.recordId, recordId), inArray(auditEntries.action, [...actions])));
  return rows.map((r) => r.userId).filter((id): id is number => id !== null);
}
