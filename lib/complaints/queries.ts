import 'server-only';
import { type SQL, and, asc, count, desc, eq, inArray } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { batches, capsuleDefects, complaints, products, users } from '../../db/schema';
import type { ComplaintState } from '../../workflows/states';
import { type Actor, assertCan } from '../auth/permissions';
import { visibleWhere } from '../records/kind';
import { isoDateOfInstant, todayIn } from '../clocks/dates';
import type { RegulatoryClockKind } from '../clocks/regulatory';
import { getSiteTimeZone } from '../site-calendar/queries';
import { type ReportCountdown, reportCountdown } from './deadline';
import { complaintKind } from './kind';
import { isNonDefectCategory, nonDefectCategories, nonDefectCategoryLabels } from './labels';
import type { ComplaintListQuery, ComplaintListSort } from './list-query';

/*
 * Read side of the complaint list: one page, paged, sorted and filtered in SQL, ids first. The row
 * DTO carries no personal data whatever the viewer's role: the list, its JSON and anything exported
 * from it name the complaint, never the complainant.
 */

export interface ComplaintRowDto {
  id: number;
  number: string;
  receivedOn: string;
  product: string | null;
  /** The lot as reported (the batch's lot number when it matched one). */
  lot: string | null;
  lotUnknown: boolean;
  category: string | null;
  categoryLabel: string | null;
  adverseEvent: boolean | null;
  seriousAdverseEvent: boolean | null;
  reportable: boolean | null;
  reportKind: RegulatoryClockKind | null;
  /** The countdown to the report deadline, for a reportable complaint. */
  report: ReportCountdown | null;
  status: ComplaintState;
  owner: string | null;
  dueAt: string | null;
  overdue: boolean;
}

export interface ComplaintPage {
  page: number;
  pageSize: number;
  total: number;
  sort: ComplaintListSort;
  dir: 'asc' | 'desc';
  rows: ComplaintRowDto[];
}

export function categoryLabel(category: string | null, defectName: string | null): string | null {
  if (category === null) return null;
  if (isNonDefectCategory(category)) return nonDefectCategoryLabels[category];
  return defectName ?? category;
}

/* Sort keys end in the columns the indexes carry (complaints_status_idx goes on with received_on), then id. */
function orderFor(sort: ComplaintListSort, dir: 'asc' | 'desc'): SQL[] {
  const by = dir === 'asc' ? asc : desc;
  switch (sort) {
    case 'number':
      return [by(complaints.number), by(complaints.id)];
    case 'received':
      return [by(complaints.receivedOn), by(complaints.id)];
    case 'status':
      return [by(complaints.status), by(complaints.receivedOn), by(complaints.id)];
    case 'due':
      return [by(complaints.dueAt), by(complaints.id)];
    case 'report_due':
      return [by(complaints.reportDueOn), by(complaints.id)];
  }
}

function whereFor(query: ComplaintListQuery, viewer: Actor): SQL | undefined {
  return and(
    // Who sees which complaint is the complaint kind's rule (an operator: the ones they took down).
    visibleWhere(complaintKind, viewer),
    query.status.length > 0 ? inArray(complaints.status, query.status) : undefined,
    query.productId !== null ? eq(complaints.productId, query.productId) : undefined,
    query.category !== null ? eq(complaints.category, query.category) : undefined,
    query.lot !== null ? eq(complaints.lotAsReported, query.lot) : undefined,
    query.reportable ? eq(complaints.reportable, true) : undefined,
    query.lotUnknown ? eq(complaints.lotUnknown, true) : undefined,
  );
}

export function complaintPageIdsQuery(query: ComplaintListQuery, viewer: Actor, database: DbOrTx = db) {
  return database
    .select({ id: complaints.id })
    .from(complaints)
    .where(whereFor(query, viewer))
    .orderBy(...orderFor(query.sort, query.dir))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
}

export async function listComplaints(query: ComplaintListQuery, viewer: Actor, database: DbOrTx = db, now: Date = new Date()): Promise<ComplaintPage> {
  assertCan(viewer, 'complaint.read');
  const where = whereFor(query, viewer);
  const [totalRow] = await database.select({ n: count() }).from(complaints).where(where);
  const pageIds = (await complaintPageIdsQuery(query, viewer, database)).map((r) => r.id);
  const today = todayIn(await getSiteTimeZone(database), now);
  const rows =
    pageIds.length === 0
      ? []
      : await database
          .select({
            id: complaints.id,
            number: complaints.number,
            receivedOn: complaints.receivedOn,
            product: products.name,
            lotAsReported: complaints.lotAsReported,
            batchLot: batches.lotNumber,
            lotUnknown: complaints.lotUnknown,
            category: complaints.category,
            defectName: capsuleDefects.name,
            adverseEvent: complaints.adverseEvent,
            seriousAdverseEvent: complaints.seriousAdverseEvent,
            reportable: complaints.reportable,
            reportKind: complaints.reportKind,
            reportDueOn: complaints.reportDueOn,
            reportSubmittedAt: complaints.reportSubmittedAt,
            status: complaints.status,
            owner: users.name,
            dueAt: complaints.dueAt,
          })
          .from(complaints)
          .leftJoin(products, eq(products.id, complaints.productId))
          .leftJoin(batches, eq(batches.id, complaints.batchId))
          .leftJoin(capsuleDefects, eq(capsuleDefects.id, complaints.defectId))
          .leftJoin(users, eq(users.id, complaints.ownerId))
          .where(inArray(complaints.id, pageIds));
  const position = new Map(pageIds.map((id, i) => [id, i]));
  rows.sort((a, b) => position.get(a.id)! - position.get(b.id)!);
  return {
    page: query.page,
    pageSize: query.pageSize,
    total: totalRow?.n ?? 0,
    sort: query.sort,
    dir: query.dir,
    rows: rows.map((r) => ({
      id: r.id,
      number: r.number,
      receivedOn: r.receivedOn,
      product: r.product,
      lot: r.batchLot ?? r.lotAsReported,
      lotUnknown: r.lotUnknown,
      category: r.category,
      categoryLabel: categoryLabel(r.category, r.defectName),
      adverseEvent: r.adverseEvent,
      seriousAdverseEvent: r.seriousAdverseEvent,
      reportable: r.reportable,
      reportKind: r.reportKind as RegulatoryClockKind | null,
      report:
        r.reportable && r.reportDueOn
          ? reportCountdown(r.reportDueOn, today, r.reportSubmittedAt ? isoDateOfInstant(r.reportSubmittedAt) : null)
          : null,
      status: r.status,
      owner: r.owner,
      dueAt: r.dueAt ? r.dueAt.toISOString() : null,
      overdue: r.dueAt !== null && r.dueAt < now && r.status !== 'closed',
    })),
  };
}

export interface OptionDto {
  value: string;
  label: string;
}

/** The complaint catalogue: the capsule defects (by code) and the non-defect categories. */
export async function listCategoryOptions(database: DbOrTx = db): Promise<{ defects: OptionDto[]; other: OptionDto[] }> {
  const defects = await database
    .select({ code: capsuleDefects.code, name: capsuleDefects.name })
    .from(capsuleDefects)
    .where(eq(capsuleDefects.active, true))
    .orderBy(asc(capsuleDefects.name));
  return {
    defects: defects.map((d) => ({ value: d.code, label: d.name })),
    other: nonDefectCategories.map((c) => ({ value: c, label: nonDefectCategoryLabels[c] })),
  };
}

export interface ProductOptionDto {
  id: number;
  label: string;
  regulatoryClass: 'supplement' | 'drug';
}

export async function listProductOptions(database: DbOrTx = db): Promise<ProductOptionDto[]> {
  const rows = await database
    .select({ id: products.id, name: products.name, strength: products.strength, code: products.code, regulatoryClass: products.regulatoryClass })
    .from(products)
    .where(eq(products.active, true))
    .orderBy(asc(products.name));
  return rows.map((p) => ({ id: p.id, label: `${p.name} ${p.strength} (${p.code})`, regulatoryClass: p.regulatoryClass }));
}

