import 'server-only';
import { and, asc, count, desc, eq, gte, inArray, isNotNull, isNull, lte, sql } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { batches, capsuleDefects, complaints, products } from '../../db/schema';
import { type Actor, assertCan, can } from '../auth/permissions';
import { type IsoDate, todayIn } from '../clocks/dates';
import { ForbiddenError } from '../errors';
import { getSiteTimeZone } from '../site-calendar/queries';
import { isNonDefectCategory, nonDefectCategoryLabels } from './labels';
import {
  type MonthTrend,
  type TrendRange,
  type YearMonth,
  addMonths,
  baselineMonths,
  firstDayOf,
  isRepeatLot,
  lastDayOf,
  monthLabel,
  monthTrends,
  monthsInRange,
  parseTrendRange,
  ratePerMillion,
} from './trending-math';

/*
 * Complaint trends for a range of months, counted in SQL: each query groups on indexed columns
 * (complaints by received_on, category, product and batch; batches by manufactured_on and product)
 * and only the grouped rows come back. The denominators are those written down in trending-math.ts.
 * Nothing here reads the complainant's name, contact or the harm text: trends carry no personal data.
 * Every complaint received in the range is counted somewhere: without a category under "not yet
 * assessed", without a matching lot under "lot not matched" or "no lot given".
 */

/** At most this many lots are listed; the rest are counted. */
export const lotRowLimit = 200;

export const notYetAssessedLabel = 'Not yet assessed';
export const productNotGivenLabel = 'Product not given';

export interface TrendMonthDto extends MonthTrend {
  label: string;
}

export interface TrendCategoryDto {
  /** Null: not yet assessed. */
  category: string | null;
  label: string;
  complaints: number;
  adverseEvents: number;
  seriousAdverseEvents: number;
  units: number;
  ratePerMillion: number | null;
}

export interface TrendProductDto {
  /** Null: the complaint names neither a product nor a lot we know. */
  productId: number | null;
  code: string | null;
  label: string;
  complaints: number;
  /** Lots of the product made in the range, and their units shipped. */
  lotsMade: number;
  units: number;
  ratePerMillion: number | null;
}

export interface TrendLotDto {
  batchId: number;
  lotNumber: string;
  productCode: string;
  productName: string;
  manufacturedOn: IsoDate;
  unitsShipped: number;
  /** Complaints on the lot received in the range. */
  complaints: number;
  /** Every complaint on the lot, whenever received: the flag and the lot's rate use this. */
  complaintsAllTime: number;
  repeat: boolean;
  ratePerMillion: number | null;
}

export interface ComplaintTrendsDto {
  range: TrendRange;
  /** The site's calendar day the default range was taken from, and the zone it was read in. */
  today: IsoDate;
  timeZone: string;
  totals: { complaints: number; lotsMade: number; units: number; ratePerMillion: number | null; signalMonths: number };
  months: TrendMonthDto[];
  categories: TrendCategoryDto[];
  products: TrendProductDto[];
  lots: TrendLotDto[];
  /** Lots with a complaint in the range (the list shows at most lotRowLimit). */
  lotsWithComplaints: number;
  /** Flagged lots among those listed. */
  repeatLots: number;
  unmatched: {
    /** A lot was given but matches no batch record. */
    lotNotMatched: number;
    /** No lot was given. */
    noLotGiven: number;
    /** The lots as reported, most complaints first (at most 20). */
    reported: { lot: string; complaints: number }[];
  };
}

const n = (v: unknown) => Number(v ?? 0);
const monthOf = (col: typeof complaints.receivedOn | typeof batches.manufacturedOn) => sql<string>`date_format(${col}, '%Y-%m')`;

/** Trends count every complaint on site, so a role that may read only its own complaints may not see them. */
export function canReadTrends(user: Actor): boolean {
  // A record owned by nobody passes only an 'any' grant.
  return can(user, 'complaint.read', { ownerIds: [] });
}

export function assertCanReadTrends(user: Actor): void {
  assertCan(user, 'complaint.read');
  if (!canReadTrends(user)) {
    throw new ForbiddenError('Trends count every complaint on site; your role may read only the complaints you entered.');
  }
}

/** The site's calendar day now, for the default range. */
export async function getTrendToday(database: DbOrTx = db, now = new Date()): Promise<{ today: IsoDate; timeZone: string }> {
  const timeZone = await getSiteTimeZone(database);
  return { today: todayIn(timeZone, now), timeZone };
}

/** The range from URL parameters (strict: ValidationError names the bad one) and the trends for it. */
export async function getComplaintTrendsFor(raw: Record<string, unknown>, database: DbOrTx = db, now = new Date()): Promise<ComplaintTrendsDto> {
  const { today, timeZone } = await getTrendToday(database, now);
  return getComplaintTrends(parseTrendRange(raw, today), { today, timeZone }, database);
}

export async function getComplaintTrends(
  range: TrendRange,
  site: { today: IsoDate; timeZone: string },
  database: DbOrTx = db,
): Promise<ComplaintTrendsDto> {
  const start = firstDayOf(range.from);
  const end = lastDayOf(range.to);
  const received = and(gte(complaints.receivedOn, start), lte(complaints.receivedOn, end));
  const made = and(gte(batches.manufacturedOn, start), lte(batches.manufacturedOn, end));

  // Months: the range plus the baseline months before it, so the first months shown have limits.
  const seriesFrom: YearMonth = addMonths(range.from, -baselineMonths);
  const [monthComplaints, monthUnits] = await Promise.all([
    database
      .select({ month: monthOf(complaints.receivedOn), complaints: count() })
      .from(complaints)
      .where(and(gte(complaints.receivedOn, firstDayOf(seriesFrom)), lte(complaints.receivedOn, end)))
      .groupBy(monthOf(complaints.receivedOn)),
    database
      .select({ month: monthOf(batches.manufacturedOn), units: sql<string>`sum(${batches.unitsShipped})`, lots: count() })
      .from(batches)
      .where(and(gte(batches.manufacturedOn, firstDayOf(seriesFrom)), lte(batches.manufacturedOn, end)))
      .groupBy(monthOf(batches.manufacturedOn)),
  ]);
  const complaintsByMonth = new Map(monthComplaints.map((r) => [r.month, n(r.complaints)]));
  const unitsByMonth = new Map(monthUnits.map((r) => [r.month, { units: n(r.units), lots: n(r.lots) }]));
  const series = monthsInRange({ from: seriesFrom, to: range.to }).map((month) => ({
    month,
    complaints: complaintsByMonth.get(month) ?? 0,
    units: unitsByMonth.get(month)?.units ?? 0,
  }));
  const months = monthTrends(series, range.from).map((m) => ({ ...m, label: monthLabel(m.month) }));
  const totalComplaints = months.reduce((s, m) => s + m.complaints, 0);
  const totalUnits = months.reduce((s, m) => s + m.units, 0);
  const lotsMade = monthsInRange(range).reduce((s, m) => s + (unitsByMonth.get(m)?.lots ?? 0), 0);

  const [categoryRows, productComplaintRows, productUnitRows, lotRows, unmatchedRows] = await Promise.all([
    database
      .select({
        category: complaints.category,
        complaints: count(),
        adverse: sql<string>`sum(case when ${complaints.adverseEvent} then 1 else 0 end)`,
        serious: sql<string>`sum(case when ${complaints.seriousAdverseEvent} then 1 else 0 end)`,
      })
      .from(complaints)
      .where(received)
      .groupBy(complaints.category),
    // A complaint that names only a lot counts for the lot's product.
    database
      .select({ productId: sql<number | null>`coalesce(${complaints.productId}, ${batches.productId})`, complaints: count() })
      .from(complaints)
      .leftJoin(batches, eq(batches.id, complaints.batchId))
      .where(received)
      .groupBy(sql`coalesce(${complaints.productId}, ${batches.productId})`),
    database
      .select({ productId: batches.productId, units: sql<string>`sum(${batches.unitsShipped})`, lots: count() })
      .from(batches)
      .where(made)
      .groupBy(batches.productId),
    database
      .select({ batchId: complaints.batchId, complaints: count() })
      .from(complaints)
      .where(and(received, isNotNull(complaints.batchId)))
      .groupBy(complaints.batchId)
      .orderBy(desc(count()), asc(complaints.batchId)),
    database
      .select({ lot: complaints.lotAsReported, complaints: count() })
      .from(complaints)
      .where(and(received, isNull(complaints.batchId)))
      .groupBy(complaints.lotAsReported)
      .orderBy(desc(count()), asc(complaints.lotAsReported)),
  ]);

  // Categories: capsule defect codes take the catalogue's names.
  const codes = categoryRows.map((r) => r.category).filter((c): c is string => c !== null && !isNonDefectCategory(c));
  const defectNames = new Map(
    codes.length === 0
      ? []
      : (await database.select({ code: capsuleDefects.code, name: capsuleDefects.name }).from(capsuleDefects).where(inArray(capsuleDefects.code, codes))).map(
          (d) => [d.code, d.name],
        ),
  );
  const categories: TrendCategoryDto[] = categoryRows
    .map((r) => ({
      category: r.category,
      label:
        r.category === null
          ? notYetAssessedLabel
          : isNonDefectCategory(r.category)
            ? nonDefectCategoryLabels[r.category]
            : (defectNames.get(r.category) ?? r.category),
      complaints: n(r.complaints),
      adverseEvents: n(r.adverse),
      seriousAdverseEvents: n(r.serious),
      units: totalUnits,
      ratePerMillion: ratePerMillion(n(r.complaints), totalUnits),
    }))
    .sort((a, b) => b.complaints - a.complaints || a.label.localeCompare(b.label));

  // Products: those with a complaint or with lots made in the range.
  const unitsByProduct = new Map(productUnitRows.map((r) => [r.productId, { units: n(r.units), lots: n(r.lots) }]));
  const complaintsByProduct = new Map(productComplaintRows.map((r) => [r.productId === null ? null : Number(r.productId), n(r.complaints)]));
  const productIds = [...new Set([...unitsByProduct.keys(), ...[...complaintsByProduct.keys()].filter((id): id is number => id !== null)])];
  const productInfo = new Map(
    productIds.length === 0
      ? []
      : (await database.select({ id: products.id, code: products.code, name: products.name }).from(products).where(inArray(products.id, productIds))).map(
          (p) => [p.id, p],
        ),
  );
  const productRows: TrendProductDto[] = productIds.map((id) => {
    const units = unitsByProduct.get(id) ?? { units: 0, lots: 0 };
    const c = complaintsByProduct.get(id) ?? 0;
    const info = productInfo.get(id);
    return { productId: id, code: info?.code ?? null, label: info?.name ?? `Product ${id}`, complaints: c, lotsMade: units.lots, units: units.units, ratePerMillion: ratePerMillion(c, units.units) };
  });
  const noProduct = complaintsByProduct.get(null);
  if (noProduct) {
    productRows.push({ productId: null, code: null, label: productNotGivenLabel, complaints: noProduct, lotsMade: 0, units: 0, ratePerMillion: null });
  }
  productRows.sort((a, b) => b.complaints - a.complaints || (a.productId === null ? 1 : b.productId === null ? -1 : a.label.localeCompare(b.label)));

  // Lots: the ones with most complaints in the range, with every complaint they have ever had.
  const shownLotIds = lotRows.slice(0, lotRowLimit).map((r) => r.batchId!);
  const [lotInfo, allTime] =
    shownLotIds.length === 0
      ? [[], []]
      : await Promise.all([
          database
            .select({
              id: batches.id,
              lotNumber: batches.lotNumber,
              manufacturedOn: batches.manufacturedOn,
              unitsShipped: batches.unitsShipped,
              productCode: products.code,
              productName: products.name,
            })
            .from(batches)
            .innerJoin(products, eq(products.id, batches.productId))
            .where(inArray(batches.id, shownLotIds)),
          database
            .select({ batchId: complaints.batchId, complaints: count() })
            .from(complaints)
            .where(inArray(complaints.batchId, shownLotIds))
            .groupBy(complaints.batchId),
        ]);
  const lotById = new Map(lotInfo.map((l) => [l.id, l]));
  const allTimeById = new Map(allTime.map((r) => [r.batchId!, n(r.complaints)]));
  const lots: TrendLotDto[] = lotRows.slice(0, lotRowLimit).flatMap((r) => {
    const lot = lotById.get(r.batchId!);
    if (!lot) return [];
    const complaintsAllTime = allTimeById.get(lot.id) ?? n(r.complaints);
    return [
      {
        batchId: lot.id,
        lotNumber: lot.lotNumber,
        productCode: lot.productCode,
        productName: lot.productName,
        manufacturedOn: lot.manufacturedOn,
        unitsShipped: lot.unitsShipped,
        complaints: n(r.complaints),
        complaintsAllTime,
        repeat: isRepeatLot(complaintsAllTime),
        ratePerMillion: ratePerMillion(complaintsAllTime, lot.unitsShipped),
      },
    ];
  });

  const given = unmatchedRows.filter((r) => r.lot !== null && r.lot.trim() !== '');
  return {
    range,
    today: site.today,
    timeZone: site.timeZone,
    totals: {
      complaints: totalComplaints,
      lotsMade,
      units: totalUnits,
      ratePerMillion: ratePerMillion(totalComplaints, totalUnits),
      signalMonths: months.filter((m) => m.signal).length,
    },
    months,
    categories,
    products: productRows,
    lots,
    lotsWithComplaints: lotRows.length,
    repeatLots: lots.filter((l) => l.repeat).length,
    unmatched: {
      lotNotMatched: given.reduce((s, r) => s + n(r.complaints), 0),
      noLotGiven: unmatchedRows.filter((r) => r.lot === null || r.lot.trim() === '').reduce((s, r) => s + n(r.complaints), 0),
      reported: given.slice(0, 20).map((r) => ({ lot: r.lot!, complaints: n(r.complaints) })),
    },
  };
}
