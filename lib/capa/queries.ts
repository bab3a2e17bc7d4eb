import 'server-only';
import { type SQL, and, asc, count, desc, eq, inArray, lt, notInArray } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { capas, complaints, deviations, users } from '../../db/schema';
import type { CapaState } from '../../workflows/states';
import { type Actor, assertCan } from '../auth/permissions';
import { visibleWhere } from '../records/kind';
import { capaKind } from './kind';
import type { CapaSource } from './labels';
import type { CapaListQuery, CapaListSort } from './list-query';

/* Read side of the CAPA list: one page, paged, sorted and filtered in SQL, ids first. */

export interface CapaRowDto {
  id: number;
  number: string;
  title: string;
  status: CapaState;
  sourceType: CapaSource;
  /** The source record's number (a deviation's DEV number), when it has one. */
  sourceNumber: string | null;
  owner: string;
  /** Completed actions of the current plan round, and how many it has. */
  actionsDone: number;
  actionsPlanned: number;
  createdAt: string;
  dueAt: string | null;
  overdue: boolean;
}

export interface CapaPage {
  page: number;
  pageSize: number;
  total: number;
  sort: CapaListSort;
  dir: 'asc' | 'desc';
  rows: CapaRowDto[];
}

export const finishedCapaStates = ['closed_effective', 'cancelled'] as const satisfies readonly CapaState[];

export function isCapaOverdue(row: { status: CapaState; dueAt: Date | null }, now: Date): boolean {
  return row.dueAt !== null && row.dueAt < now && !(finishedCapaStates as readonly string[]).includes(row.status);
}

/* Sort keys end in the columns the indexes carry (capas_status_idx goes on with created_at, capas_due_idx is (status, due_at)), then id. */
function orderFor(sort: CapaListSort, dir: 'asc' | 'desc'): SQL[] {
  const by = dir === 'asc' ? asc : desc;
  switch (sort) {
    case 'number':
      return [by(capas.number), by(capas.id)];
    case 'due':
      return [by(capas.dueAt), by(capas.id)];
    case 'status':
      return [by(capas.status), by(capas.createdAt), by(capas.id)];
    case 'created':
      return [by(capas.createdAt), by(capas.id)];
  }
}

function whereFor(query: CapaListQuery, viewer: Actor, now: Date): SQL | undefined {
  return and(
    // Who sees which CAPA is the CAPA kind's rule (today every role that reads CAPAs sees them all).
    visibleWhere(capaKind, viewer),
    query.status.length > 0 ? inArray(capas.status, query.status) : undefined,
    query.source.length > 0 ? inArray(capas.sourceType, query.source) : undefined,
    query.ownerId !== null ? eq(capas.ownerId, query.ownerId) : undefined,
    query.overdue ? and(lt(capas.dueAt, now), notInArray(capas.status, [...finishedCapaStates])) : undefined,
  );
}

export function capaPageIdsQuery(query: CapaListQuery, viewer: Actor, database: DbOrTx = db, now: Date = new Date()) {
  return database
    .select({ id: capas.id })
    .from(capas)
    .where(whereFor(query, viewer, now))
    .orderBy(...orderFor(query.sort, query.dir))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
}

/** One page of CAPAs; every role that reads CAPAs sees them all (capa.read is 'any'). */
export async function listCapas(query: CapaListQuery, viewer: Actor, database: DbOrTx = db, now: Date = new Date()): Promise<CapaPage> {
  assertCan(viewer, 'capa.read');
  const [totalRow] = await database.select({ n: count() }).from(capas).where(whereFor(query, viewer, now));
  const pageIds = (await capaPageIdsQuery(query, viewer, database, now)).map((r) => r.id);
  const rows =
    pageIds.length === 0
      ? []
      : await database
          .select({
            id: capas.id,
            number: capas.number,
            title: capas.title,
            status: capas.status,
            sourceType: capas.sourceType,
            sourceId: capas.sourceId,
            sourceNumber: deviations.number,
            owner: users.name,
            actionsPlanned: capas.actionsPlanned,
            actionsOpen: capas.actionsOpen,
            createdAt: capas.createdAt,
            dueAt: capas.dueAt,
          })
          .from(capas)
          .innerJoin(users, eq(users.id, capas.ownerId))
          // Only deviations have numbers to show yet; other sources show their kind.
          .leftJoin(deviations, and(eq(capas.sourceType, 'deviation'), eq(deviations.id, capas.sourceId)))
          .where(inArray(capas.id, pageIds));
  const position = new Map(pageIds.map((id, i) => [id, i]));
  rows.sort((a, b) => position.get(a.id)! - position.get(b.id)!);
  return {
    page: query.page,
    pageSize: query.pageSize,
    total: totalRow?.n ?? 0,
    sort: query.sort,
    dir: query.dir,
    rows: rows.map(({ createdAt, dueAt, actionsOpen, sourceId: _sourceId, ...r }) => ({
      ...r,
      actionsDone: r.actionsPlanned - actionsOpen,
      createdAt: createdAt.toISOString(),
      dueAt: dueAt ? dueAt.toISOString() : null,
      overdue: isCapaOverdue({ status: r.status, dueAt }, now),
    })),
  };
}

export interface CapaOwnerOptionDto {
  id: number;
  label: string;
}

/** Owners for the list filter: everybody who owns a CAPA now. */
export async function listCapaOwners(database: DbOrTx = db): Promise<CapaOwnerOptionDto[]> {
  const rows = await database
    .selectDistinct({ id: users.id, name: users.name })
    .from(capas)
    .innerJoin(users, eq(users.id, capas.ownerId))
    .orderBy(asc(users.name));
  return rows.map((r) => ({ id: r.id, label: r.name }));
}

/**
 * The id of the deviation or complaint with this number, for opening a CAPA from it; null when there
 * is none the viewer may read (a draft has no number, so it is never found).
 */
export async function findCapaSourceByNumber(
  sourceType: 'deviation' | 'complaint',
  number: string,
  viewer: Actor,
  database: DbOrTx = db,
): Promise<number | null> {
  // Only those who may open a CAPA look its source up (QA); they read every deviation and complaint.
  assertCan(viewer, 'capa.create');
  if (sourceType === 'deviation') {
    assertCan(viewer, 'deviation.read');
    const [row] = await database.select({ id: deviations.id }).from(deviations).where(eq(deviations.number, number));
    return row?.id ?? null;
  }
  assertCan(viewer, 'complaint.read');
  const [row] = await database.select({ id: complaints.id }).from(complaints).where(eq(complaints.number, number));
  return row?.id ?? null;
}
