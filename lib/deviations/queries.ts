import 'server-only';
import { type SQL, and, asc, count, desc, eq, gte, inArray, lt, notInArray, sql } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { batches, capsuleDefects, classifications, deviations, fillingRings, machines, products, users } from '../../db/schema';
import { type Actor, assertCan } from '../auth/permissions';
import { visibleWhere } from '../records/kind';
import { deviationKind } from './kind';
import type { DeviationState } from '../../workflows/states';
import type { DeviationListQuery, DeviationListSort, SortDirection } from '../validation/deviation-list';

/* Read side of deviations: DTOs for the list (and later the detail page). */

export type Classification = (typeof classifications)[number];

export interface DeviationRowDto {
  id: number;
  /** DEV-YYYY-NNNN; null while a draft. */
  number: string | null;
  /** When the record was raised (created), ISO 8601 UTC. */
  raisedAt: string;
  /** Whole days from raised to closed, or to now while open. */
  ageDays: number;
  title: string;
  defect: string | null;
  product: string | null;
  lot: string | null;
  /** The filler's asset tag. */
  machine: string | null;
  /** The filling ring's serial. */
  ring: string | null;
  classification: Classification | null;
  rpn: number | null;
  status: DeviationState;
  owner: string | null;
  dueAt: string | null;
  overdue: boolean;
}

export interface DeviationPage {
  page: number;
  pageSize: number;
  total: number;
  sort: DeviationListSort;
  dir: SortDirection;
  rows: DeviationRowDto[];
}

/** States in which a due date no longer runs. */
const finishedStates = ['closed', 'cancelled'] as const satisfies readonly DeviationState[];
const dayMs = 86_400_000;

export function isOverdue(row: { status: DeviationState; dueAt: Date | null }, now: Date): boolean {
  return row.dueAt !== null && row.dueAt < now && !(finishedStates as readonly string[]).includes(row.status);
}

/*
 * Sort keys end in the column each index already carries after its leading one (status and
 * classification lead indexes that go on with created_at), then id: an index scan yields the page
 * in order without sorting the table, and equal keys page stably.
 */
function orderFor(sort: DeviationListSort, dir: SortDirection): SQL[] {
  const by = dir === 'asc' ? asc : desc;
  switch (sort) {
    case 'number':
      return [by(deviations.number), by(deviations.id)];
    case 'due':
      return [by(deviations.dueAt), by(deviations.id)];
    case 'rpn':
      return [by(deviations.rpn), by(deviations.id)];
    case 'status':
      return [by(deviations.status), by(deviations.createdAt), by(deviations.id)];
    case 'classification':
      return [by(deviations.classification), by(deviations.createdAt), by(deviations.id)];
    case 'raised':
      return [by(deviations.createdAt), by(deviations.id)];
  }
}

function whereFor(query: DeviationListQuery, viewer: Actor, now: Date): SQL | undefined {
  const conditions: (SQL | undefined)[] = [
    // Who sees which deviation is the deviation kind's rule (a draft is its author's alone).
    visibleWhere(deviationKind, viewer),
    query.status.length > 0 ? inArray(deviations.status, query.status) : undefined,
    query.classification.length > 0 ? inArray(deviations.classification, query.classification) : undefined,
    query.productId !== null ? eq(deviations.productId, query.productId) : undefined,
    query.batchId !== null ? eq(deviations.batchId, query.batchId) : undefined,
    query.lot !== null
      ? sql`${deviations.batchId} = (select ${batches.id} from ${batches} where ${batches.lotNumber} = ${query.lot})`
      : undefined,
    query.machineId !== null ? eq(deviations.machineId, query.machineId) : undefined,
    query.ringId !== null ? eq(deviations.ringId, query.ringId) : undefined,
    query.defectId !== null ? eq(deviations.defectId, query.defectId) : undefined,
    query.ownerId !== null ? eq(deviations.ownerId, query.ownerId) : undefined,
    // Raised dates are whole UTC days, the "to" day included.
    query.raisedFrom !== null ? gte(deviations.createdAt, new Date(`${query.raisedFrom}T00:00:00.000Z`)) : undefined,
    query.raisedTo !== null
      ? lt(deviations.createdAt, new Date(Date.parse(`${query.raisedTo}T00:00:00.000Z`) + dayMs))
      : undefined,
    query.overdue ? and(lt(deviations.dueAt, now), notInArray(deviations.status, [...finishedStates])) : undefined,
  ];
  return and(...conditions);
}

/** The ids of one page, from the deviations table alone; exported so a test can EXPLAIN the real statement. */
export function pageIdsQuery(query: DeviationListQuery, viewer: Actor, database: DbOrTx = db, now: Date = new Date()) {
  return database
    .select({ id: deviations.id })
    .from(deviations)
    .where(whereFor(query, viewer, now))
    .orderBy(...orderFor(query.sort, query.dir))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
}

/**
 * One page of deviations the viewer may see, paged, sorted and filtered in SQL. The page's ids come
 * from the deviations indexes alone; only those rows are then joined to their lookups (a single
 * joined statement lets MariaDB start from a small lookup table and sort every deviation in a
 * temporary table; see DEVELOPERS.md, "Lists at scale").
 */
export async function listDeviations(
  query: DeviationListQuery,
  viewer: Actor,
  database: DbOrTx = db,
  now: Date = new Date(),
): Promise<DeviationPage> {
  assertCan(viewer, 'deviation.read');
  const where = whereFor(query, viewer, now);
  const [totalRow] = await database.select({ n: count() }).from(deviations).where(where);
  const pageIds = (await pageIdsQuery(query, viewer, database, now)).map((r) => r.id);

  const owner = users;
  const rows =
    pageIds.length === 0
      ? []
      : await database
          .select({
            id: deviations.id,
            number: deviations.number,
            createdAt: deviations.createdAt,
            closedAt: deviations.closedAt,
            title: deviations.title,
            defect: capsuleDefects.name,
            product: products.name,
            lot: batches.lotNumber,
            machine: machines.assetTag,
            ring: fillingRings.serial,
            classification: deviations.classification,
            rpn: deviations.rpn,
            status: deviations.status,
            owner: owner.name,
            dueAt: deviations.dueAt,
          })
          .from(deviations)
          .leftJoin(capsuleDefects, eq(capsuleDefects.id, deviations.defectId))
          .leftJoin(products, eq(products.id, deviations.productId))
          .leftJoin(batches, eq(batches.id, deviations.batchId))
          .leftJoin(machines, eq(machines.id, deviations.machineId))
          .leftJoin(fillingRings, eq(fillingRings.id, deviations.ringId))
          .leftJoin(owner, eq(owner.id, deviations.ownerId))
          .where(inArray(deviations.id, pageIds));

  const position = new Map(pageIds.map((id, i) => [id, i]));
  rows.sort((a, b) => position.get(a.id)! - position.get(b.id)!);
  return {
    page: query.page,
    pageSize: query.pageSize,
    total: totalRow?.n ?? 0,
    sort: query.sort,
    dir: query.dir,
    rows: rows.map(({ createdAt, closedAt, dueAt, ...row }) => ({
      ...row,
      raisedAt: createdAt.toISOString(),
      ageDays: Math.max(0, Math.floor(((closedAt ?? now).getTime() - createdAt.getTime()) / dayMs)),
      dueAt: dueAt ? dueAt.toISOString() : null,
      overdue: isOverdue({ status: row.status, dueAt }, now),
    })),
  };
}
