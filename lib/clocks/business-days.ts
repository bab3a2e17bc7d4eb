import { fromDayNumber, type IsoDate, isWeekend, toDayNumber, weekdayNames, weekday } from './dates';
import { observedFederalHoliday } from './holidays';

/*
 * Business days: Monday to Friday, minus observed US federal holidays, minus the site's own
 * closures (a plant shutdown week, a local holiday). Counting follows the usual rule for periods
 * "within n days of" an event: the day of the event is day 0 and is never counted, the first
 * business day after it is day 1.
 */

export interface SiteClosureDay {
  day: IsoDate;
  description: string;
}

export interface BusinessCalendar {
  /** Active site closures by day. */
  readonly closures: ReadonlyMap<IsoDate, string>;
}

export type NonBusinessReason =
  | { kind: 'weekend'; label: string }
  | { kind: 'federal_holiday'; label: string }
  | { kind: 'site_closure'; label: string };

/** A calendar with the given site closures; with none, it is the federal calendar. */
export function makeCalendar(closures: readonly SiteClosureDay[] = []): BusinessCalendar {
  return { closures: new Map(closures.map((c) => [c.day, c.description])) };
}

/** Weekends and federal holidays only: the calendar regulatory clocks run on. */
export const federalCalendar: BusinessCalendar = makeCalendar();

/** Why `date` is not a business day, or null when it is one. A federal holiday wins over a closure. */
export function nonBusinessReason(date: IsoDate, calendar: BusinessCalendar): NonBusinessReason | null {
  if (isWeekend(date)) return { kind: 'weekend', label: weekdayNames[weekday(date)]! };
  const holiday = observedFederalHoliday(date);
  if (holiday) {
    const label = holiday.observed === holiday.date ? holiday.name : `${holiday.name} (observed)`;
    return { kind: 'federal_holiday', label };
  }
  const closure = calendar.closures.get(date);
  if (closure !== undefined) return { kind: 'site_closure', label: closure };
  return null;
}

export function isBusinessDay(date: IsoDate, calendar: BusinessCalendar): boolean {
  return nonBusinessReason(date, calendar) === null;
}

function assertCount(n: number): void {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`Expected a whole number of business days ≥ 0, got ${n}.`);
}

/**
 * The n-th business day after `start` (start itself is day 0 and not counted, whatever kind of
 * day it is). n = 0 gives `start` back.
 */
export function addBusinessDays(start: IsoDate, n: number, calendar: BusinessCalendar): IsoDate {
  assertCount(n);
  let day = toDayNumber(start);
  let left = n;
  while (left > 0) {
    day += 1;
    if (isBusinessDay(fromDayNumber(day), calendar)) left -= 1;
  }
  return fromDayNumber(day);
}

/**
 * Business days d with from < d ≤ to; negative (the count the other way) when `to` is before
 * `from`. So for a business day `to`, addBusinessDays(from, businessDaysBetween(from, to)) = to.
 */
export function businessDaysBetween(from: IsoDate, to: IsoDate, calendar: BusinessCalendar): number {
  const a = toDayNumber(from);
  const b = toDayNumber(to);
  if (b < a) return -businessDaysBetween(to, from, calendar);
  let count = 0;
  for (let day = a + 1; day <= b; day++) {
    if (isBusinessDay(fromDayNumber(day), calendar)) count += 1;
  }
  return count;
}
