import 'server-only';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { auditEntries, stateHistory, users } from '../../db/schema';
import type { FieldChange } from '../audit/hash';
import { type AnyRecordKind, eventLabel, stateLabel } from './kind';
import type { RecordType } from './types';

/* A record's story as DTOs: its lifecycle history and its audit trail, newest first. */

export interface HistoryEntryDto {
  id: number;
  event: string;
  eventLabel: string;
  fromState: string | null;
  fromLabel: string | null;
  toState: string;
  toLabel: string;
  userId: number;
  userName: string;
  comment: string | null;
  /** ISO 8601, UTC. */
  at: string;
}

export async function listStateHistory(
  dbOrTx: DbOrTx,
  kind: AnyRecordKind,
  recordId: number,
  limit = 200,
): Promise<HistoryEntryDto[]> {
  const rows = await dbOrTx
    .select({
      id: stateHistory.id,
      event: stateHistory.event,
      fromState: stateHistory.fromState,
      toState: stateHistory.toState,
      userId: stateHistory.userId,
      userName: users.name,
      comment: stateHistory.comment,
      at: stateHistory.at,
    })
    .from(stateHistory)
    .innerJoin(users, eq(users.id, stateHistory.userId))
    .where(and(eq(stateHistory.recordType, kind.recordType), eq(stateHistory.recordId, recordId)))
    .orderBy(desc(stateHistory.id))
    .limit(limit);
  return rows.map((r) => ({
    ...r,
    eventLabel: r.event === 'create' ? 'Created' : eventLabel(kind, r.event),
    fromLabel: r.fromState ? stateLabel(kind, r.fromState) : null,
    toLabel: stateLabel(kind, r.toState),
    at: r.at.toISOString(),
  }));
}

export interface AuditEntryDto {
  id: number;
  /** ISO 8601, UTC (the stored text is hashed as 'YYYY-MM-DD HH:MM:SS.mmm'). */
  at: string;
  userId: number | null;
  userName: string;
  action: string;
  changes: FieldChange[];
  reason: string | null;
}

/**
 * A record's audit entries, newest first (or oldest first), at most `limit`. `recordId` may list
 * several ids when a record was audited under an earlier id (a site closure before closures had ids).
 */
export async function listAuditTrail(
  dbOrTx: DbOrTx,
  recordType: RecordType,
  recordId: number | readonly number[],
  { limit = 200, oldestFirst = false }: { limit?: number; oldestFirst?: boolean } = {},
): Promise<AuditEntryDto[]> {
  const ids = typeof recordId === 'number' ? [recordId] : [...recordId];
  const rows = await dbOrTx
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), ids.length === 1 ? eq(auditEntries.recordId, ids[0]!) : inArray(auditEntries.recordId, ids)))
    .orderBy(oldestFirst ? asc(auditEntries.id) : desc(auditEntries.id))
    .limit(limit);
  return rows.map((r) => ({
    id: r.id,
    at: `${r.at.replace(' ', 'T')}Z`,
    userId: r.userId,
    userName: r.userName,
    action: r.action,
    changes: JSON.parse(r.changes) as FieldChange[],
    reason: r.reason,
  }));
}
