/*
 * Calendar dates as plain 'YYYY-MM-DD' strings. A date here is a day on the site's wall calendar,
 * not an instant: all arithmetic goes through UTC midnight so the server's or the browser's time
 * zone can never move a day (a local-time Date built from '2026-03-08' can land on the 7th).
 */

export type IsoDate = string;

const isoPattern = /^(\d{4})-(\d{2})-(\d{2})$/;
const dayMs = 86_400_000;

export const weekdayNames = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'] as const;

/** Days since 1970-01-01 for a valid 'YYYY-MM-DD'; throws RangeError for anything else (e.g. '2026-02-30'). */
export function toDayNumber(date: IsoDate): number {
  const m = isoPattern.exec(date);
  if (!m) throw new RangeError(`Expected a date as YYYY-MM-DD, got "${date}".`);
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const ms = Date.UTC(y, mo - 1, d);
  const check = new Date(ms);
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d) {
    throw new RangeError(`${date} is not a calendar date.`);
  }
  return ms / dayMs;
}

export function fromDayNumber(day: number): IsoDate {
  return new Date(day * dayMs).toISOString().slice(0, 10);
}

export function isIsoDate(value: string): boolean {
  try {
    toDayNumber(value);
    return true;
  } catch {
    return false;
  }
}

/** The UTC calendar day of an instant, e.g. a timestamp stored in UTC. */
export function isoDateOfInstant(instant: Date): IsoDate {
  return instant.toISOString().slice(0, 10);
}

export function makeDate(year: number, month: number, day: number): IsoDate {
  return fromDayNumber(Date.UTC(year, month - 1, day) / dayMs);
}

export function addDays(date: IsoDate, days: number): IsoDate {
  return fromDayNumber(toDayNumber(date) + days);
}

/** Whole calendar days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: IsoDate, to: IsoDate): number {
  return toDayNumber(to) - toDayNumber(from);
}

/** 0 = Sunday … 6 = Saturday. 1970-01-01 was a Thursday. */
export function weekday(date: IsoDate): number {
  return (((toDayNumber(date) + 4) % 7) + 7) % 7;
}

export function isWeekend(date: IsoDate): boolean {
  const w = weekday(date);
  return w === 0 || w === 6;
}

/**
 * The same month and day `years` later. A 29 February with no counterpart becomes 1 March: for
 * retention periods the later of the two candidate days, so a record is never discarded early.
 */
export function addYears(date: IsoDate, years: number): IsoDate {
  const day = toDayNumber(date);
  const d = new Date(day * dayMs);
  return fromDayNumber(Date.UTC(d.getUTCFullYear() + years, d.getUTCMonth(), d.getUTCDate()) / dayMs);
}

export function yearOf(date: IsoDate): number {
  return Number(date.slice(0, 4));
}

/** 'Friday 24 December 2027' — unambiguous on both sides of the Atlantic. */
export function formatLongDate(date: IsoDate): string {
  const d = new Date(toDayNumber(date) * dayMs);
  const month = d.toLocaleString('en-US', { month: 'long', timeZone: 'UTC' });
  return `${weekdayNames[d.getUTCDay()]} ${d.getUTCDate()} ${month} ${d.getUTCFullYear()}`;
}

/**
 * The calendar day it is at `instant` in an IANA time zone (the site's), e.g. 'America/Chicago'.
 * 'UTC' gives the same as isoDateOfInstant. Throws RangeError for an unknown zone.
 */
export function todayIn(timeZone: string, instant: Date): IsoDate {
  const parts = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(instant);
  const part = (type: string) => parts.find((p) => p.type === type)!.value;
  return `${part('year')}-${part('month')}-${part('day')}`;
}
