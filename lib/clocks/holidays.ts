import { addDays, type IsoDate, makeDate, weekday, yearOf } from './dates';

/*
 * US federal legal public holidays, 5 U.S.C. 6103(a), with the day they are observed. When a
 * fixed-date holiday falls on a Sunday it is observed on the Monday after (6103(b)(1)); on a
 * Saturday, on the Friday before (6103(b)(2) for employees on a Monday–Friday week, and Executive
 * Order 11582 for the rest of the Executive branch). New Year's Day on a Saturday is therefore
 * observed on 31 December of the year before.
 *
 * Inauguration Day (6103(c)) is left out: it is a holiday only for federal employees in the
 * Washington, D.C. area. The list is the one in force from 1986 (the first observance of the
 * Birthday of Martin Luther King, Jr.); Juneteenth National Independence Day is included from
 * 2021 (Pub. L. 117-17). Earlier years are refused rather than answered wrongly.
 */

export const firstSupportedYear = 1986;
export const lastSupportedYear = 2199;
const juneteenthFrom = 2021;

export interface FederalHoliday {
  name: string;
  /** The day the statute names. */
  date: IsoDate;
  /** The day offices close; differs from `date` only for a fixed-date holiday on a weekend. */
  observed: IsoDate;
}

/** The `nth` (1-based) given weekday of a month; nth = -1 for the last one. */
function nthWeekday(year: number, month: number, dayOfWeek: number, nth: number): IsoDate {
  if (nth === -1) {
    const last = makeDate(year, month + 1, 0);
    return addDays(last, -((weekday(last) - dayOfWeek + 7) % 7));
  }
  const first = makeDate(year, month, 1);
  return addDays(first, ((dayOfWeek - weekday(first) + 7) % 7) + 7 * (nth - 1));
}

function observedDay(date: IsoDate): IsoDate {
  const w = weekday(date);
  if (w === 6) return addDays(date, -1);
  if (w === 0) return addDays(date, 1);
  return date;
}

function assertSupportedYear(year: number): void {
  // One year past the last, so 31 December of the last year can look at the next New Year's Day.
  if (!Number.isInteger(year) || year < firstSupportedYear || year > lastSupportedYear + 1) {
    throw new RangeError(`Federal holidays are computed for ${firstSupportedYear}–${lastSupportedYear}; got ${year}.`);
  }
}

const MON = 1;
const THU = 4;
const cache = new Map<number, readonly FederalHoliday[]>();

/** The holidays whose statutory date is in `year`, in date order. */
export function federalHolidays(year: number): readonly FederalHoliday[] {
  assertSupportedYear(year);
  const cached = cache.get(year);
  if (cached) return cached;
  const fixed = (name: string, month: number, day: number): FederalHoliday => {
    const date = makeDate(year, month, day);
    return { name, date, observed: observedDay(date) };
  };
  const monday = (name: string, month: number, nth: number): FederalHoliday => {
    const date = nthWeekday(year, month, MON, nth);
    return { name, date, observed: date };
  };
  const thanksgiving = nthWeekday(year, 11, THU, 4);
  const list: FederalHoliday[] = [
    fixed('New Year’s Day', 1, 1),
    monday('Birthday of Martin Luther King, Jr.', 1, 3),
    monday('Washington’s Birthday', 2, 3),
    monday('Memorial Day', 5, -1),
    ...(year >= juneteenthFrom ? [fixed('Juneteenth National Independence Day', 6, 19)] : []),
    fixed('Independence Day', 7, 4),
    monday('Labor Day', 9, 1),
    monday('Columbus Day', 10, 2),
    fixed('Veterans Day', 11, 11),
    { name: 'Thanksgiving Day', date: thanksgiving, observed: thanksgiving },
    fixed('Christmas Day', 12, 25),
  ];
  cache.set(year, list);
  return list;
}

/**
 * The holidays observed on a day of `year`: the year's own, minus a New Year's Day observed in
 * the year before, plus next year's New Year's Day when it is observed on 31 December.
 */
export function observedHolidaysInYear(year: number): readonly FederalHoliday[] {
  const own = federalHolidays(year).filter((h) => yearOf(h.observed) === year);
  const next = federalHolidays(year + 1)[0]!;
  return yearOf(next.observed) === year ? [...own, next] : own;
}

/** The federal holiday observed on `date`, if any. */
export function observedFederalHoliday(date: IsoDate): FederalHoliday | null {
  return observedHolidaysInYear(yearOf(date)).find((h) => h.observed === date) ?? null;
}

/** Observed holidays on or after `from`, in order, at most `limit` of them. */
export function upcomingFederalHolidays(from: IsoDate, limit: number): FederalHoliday[] {
  const out: FederalHoliday[] = [];
  for (let year = yearOf(from); out.length < limit; year++) {
    for (const h of observedHolidaysInYear(year)) {
      if (h.observed >= from && out.length < limit) out.push(h);
    }
  }
  return out;
}
