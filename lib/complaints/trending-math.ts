import { z } from 'zod';
import { type IsoDate, makeDate } from '../clocks/dates';
import { ValidationError } from '../errors';
import { parseInput } from '../validation/parse';

/*
 * Complaint trending arithmetic: months, rates per million units shipped and the rule that marks a
 * month as standing out. Pure (no I/O), so the page, the JSON route and the tests share it.
 *
 * The denominator (common practice; the site's complaint procedure may define its own):
 * - a lot: the units shipped of that lot, as its batch record holds them;
 * - a month: the units shipped of the lots made in that month. The batch record keeps how many
 *   units of a lot were shipped but not when, so the month a lot was made stands in for the month
 *   it went out; complaints are counted by the month they were received;
 * - a product: the units shipped of that product's lots made within the range;
 * - a category, and the range as a whole: the units shipped of every lot made within the range
 *   (a category cuts across products, so every lot could have drawn it).
 * Complaints received in the range may concern lots made before it; over a range of a year the
 * mismatch is small next to the counts, which is why twelve months is the default.
 */

/** 'YYYY-MM'. */
export type YearMonth = string;

export interface TrendRange {
  from: YearMonth;
  to: YearMonth;
}

export const defaultTrendMonths = 12;
/** Longest range the screen and the API accept: five years of months is still a readable chart. */
export const maxTrendMonths = 60;
export const noUnitsText = 'No units shipped on record';

const yearMonthPattern = /^(\d{4})-(0[1-9]|1[0-2])$/;

function monthIndex(month: YearMonth): number {
  const m = yearMonthPattern.exec(month);
  if (!m) throw new RangeError(`Expected a month as YYYY-MM, got "${month}".`);
  return Number(m[1]) * 12 + Number(m[2]) - 1;
}

function fromMonthIndex(index: number): YearMonth {
  const year = Math.floor(index / 12);
  return `${String(year).padStart(4, '0')}-${String((index % 12) + 1).padStart(2, '0')}`;
}

export function addMonths(month: YearMonth, months: number): YearMonth {
  return fromMonthIndex(monthIndex(month) + months);
}

/** Every month from `from` to `to`, both included. */
export function monthsInRange(range: TrendRange): YearMonth[] {
  const first = monthIndex(range.from);
  const last = monthIndex(range.to);
  return Array.from({ length: Math.max(0, last - first + 1) }, (_, i) => fromMonthIndex(first + i));
}

export function firstDayOf(month: YearMonth): IsoDate {
  return `${month}-01`;
}

export function lastDayOf(month: YearMonth): IsoDate {
  const i = monthIndex(month) + 1;
  return makeDate(Math.floor(i / 12), (i % 12) + 1, 0);
}

/** 'Jul 2026'. */
export function monthLabel(month: YearMonth): string {
  const i = monthIndex(month);
  return `${['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'][i % 12]} ${Math.floor(i / 12)}`;
}

/** The last `months` months up to and including the month of `today` (the site's calendar day). */
export function defaultTrendRange(today: IsoDate, months = defaultTrendMonths): TrendRange {
  const to = today.slice(0, 7);
  return { from: addMonths(to, -(months - 1)), to };
}

/** Half away from zero at two decimals; the exponent trick keeps 1.005 from rounding down to 1. */
export function round2(value: number): number {
  return Math.sign(value) * Number(`${Math.round(Number(`${Math.abs(value)}e2`))}e-2`);
}

/** Complaints per million units shipped, to two decimals; null when no units are on record. */
export function ratePerMillion(complaints: number, units: number): number | null {
  if (!(units > 0)) return null;
  return round2((complaints / units) * 1_000_000);
}

/** A lot with more than one complaint is flagged for review as a possible lot-wide problem. */
export function isRepeatLot(complaints: number): boolean {
  return complaints > 1;
}

/*
 * The month signal: a u-chart upper limit (Montgomery, Introduction to Statistical Quality Control,
 * control chart for nonconformities per unit with variable sample size — from memory): with ū the
 * baseline complaints per million and n the month's units in millions, UCL = ū + 3·√(ū / n). The
 * baseline is the previous six months that have units on record (a moving baseline, so a slow
 * drift does not hide a jump; six months is common practice for complaint trending), pooled as
 * Σ complaints / Σ millions of units. Fewer than three such months, or a baseline without any
 * complaint, gives no limit: a zero baseline would make any single complaint a signal.
 */
export const baselineMonths = 6;
export const minBaselineMonths = 3;
export const sigmaMultiple = 3;

export interface MonthCount {
  month: YearMonth;
  complaints: number;
  /** Units shipped of the lots made in this month. */
  units: number;
}

export interface MonthTrend extends MonthCount {
  ratePerMillion: number | null;
  baselineRate: number | null;
  upperLimit: number | null;
  signal: boolean;
  /** Why there is no rate or no limit, or what the signal means; null when the month is unremarkable. */
  note: string | null;
}

/**
 * Rates, limits and signals for each month of `series` from `firstShown` on. `series` must be
 * contiguous and ascending and should start `baselineMonths` before `firstShown`, so the first
 * months shown have their baseline too.
 */
export function monthTrends(series: MonthCount[], firstShown: YearMonth): MonthTrend[] {
  const out: MonthTrend[] = [];
  series.forEach((point, i) => {
    if (point.month < firstShown) return;
    const rate = ratePerMillion(point.complaints, point.units);
    const base = series.slice(Math.max(0, i - baselineMonths), i).filter((p) => p.units > 0);
    const baseComplaints = base.reduce((s, p) => s + p.complaints, 0);
    const baseMillions = base.reduce((s, p) => s + p.units, 0) / 1_000_000;
    const baselineRate = base.length >= minBaselineMonths ? baseComplaints / baseMillions : null;
    let upperLimit: number | null = null;
    let signal = false;
    let note: string | null = null;
    if (rate === null) {
      note = `${noUnitsText} for lots made this month: no rate.`;
    } else if (baselineRate === null) {
      note = `Fewer than ${minBaselineMonths} of the previous ${baselineMonths} months have units on record: no limit yet.`;
    } else if (baselineRate === 0) {
      note = `No complaints in the previous ${baselineMonths} months: no limit (it needs a baseline rate above zero).`;
    } else {
      const limit = baselineRate + sigmaMultiple * Math.sqrt(baselineRate / (point.units / 1_000_000));
      upperLimit = round2(limit);
      signal = (point.complaints / point.units) * 1_000_000 > limit;
      if (signal) note = 'Above the upper limit of the previous months: look for a common cause.';
    }
    out.push({
      ...point,
      ratePerMillion: rate,
      baselineRate: baselineRate === null ? null : round2(baselineRate),
      upperLimit,
      signal,
      note,
    });
  });
  return out;
}

/* The range as it sits in the URL (?from=YYYY-MM&to=YYYY-MM). */

const yearMonth = (label: string) =>
  z
    .string({ error: `${label} must be a month as YYYY-MM, e.g. 2026-07.` })
    .trim()
    .regex(yearMonthPattern, { error: `${label} must be a month as YYYY-MM, e.g. 2026-07.` })
    .refine((v) => v >= '2000-01' && v <= '2099-12', { error: `${label} must be a month between 2000 and 2099.` });

function scalar(v: unknown): unknown {
  const x = Array.isArray(v) ? v[0] : v;
  return x === '' || x === null ? undefined : x;
}

export const trendRangeSchema = z.object({
  from: z.preprocess(scalar, yearMonth('From').optional()),
  to: z.preprocess(scalar, yearMonth('To').optional()),
});

/**
 * The range asked for, with the gaps filled: no `to` means the month of `today` (or `from`, when
 * `from` is later), no `from` means twelve months ending at `to`. Throws ValidationError (422)
 * naming the bad parameter, also when the filled range runs backwards or is too long.
 */
export function parseTrendRange(raw: Record<string, unknown>, today: IsoDate): TrendRange {
  const { from, to } = parseInput(trendRangeSchema, raw);
  const thisMonth = today.slice(0, 7);
  const end = to ?? (from && from > thisMonth ? from : thisMonth);
  const start = from ?? addMonths(end, -(defaultTrendMonths - 1));
  if (start > end) throw new ValidationError('Check the months.', { to: ['To must be the same month as From or later.'] });
  if (monthIndex(end) - monthIndex(start) + 1 > maxTrendMonths) {
    throw new ValidationError('Check the months.', { [to ? 'to' : 'from']: [`Choose at most ${maxTrendMonths} months.`] });
  }
  return { from: start, to: end };
}
