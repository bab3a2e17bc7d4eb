import { describe, expect, it } from 'vitest';
import {
  addDays,
  addYears,
  daysBetween,
  formatLongDate,
  isIsoDate,
  isoDateOfInstant,
  isWeekend,
  toDayNumber,
  weekday,
} from '../../../lib/clocks/dates';

// Calendar facts (proleptic Gregorian calendar, ISO 8601 dates); no regulation involved.
describe('calendar dates as YYYY-MM-DD', () => {
  it('refuses text that is not a date and days that do not exist', () => {
    expect(() => toDayNumber('2026-7-1')).toThrow(RangeError);
    expect(() => toDayNumber('2026-02-29')).toThrow(/not a calendar date/); // 2026 is not a leap year
    expect(() => toDayNumber('2026-13-01')).toThrow(RangeError);
    expect(isIsoDate('2028-02-29')).toBe(true); // 2028 is a leap year
    expect(isIsoDate('yesterday')).toBe(false);
  });

  it('knows the weekday of known dates, before and after 1970', () => {
    expect(weekday('1970-01-01')).toBe(4); // Thursday
    expect(weekday('1969-12-31')).toBe(3); // Wednesday
    expect(weekday('2026-11-26')).toBe(4); // Thanksgiving 2026 is a Thursday
    expect(isWeekend('2026-07-04')).toBe(true); // Saturday
    expect(isWeekend('2026-07-05')).toBe(true); // Sunday
    expect(isWeekend('2026-07-03')).toBe(false);
  });

  it('adds and counts days across month, year and DST changes without drifting', () => {
    expect(addDays('2026-03-07', 1)).toBe('2026-03-08'); // US DST starts 2026-03-08
    expect(addDays('2026-11-01', 1)).toBe('2026-11-02'); // US DST ends 2026-11-01
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
    expect(daysBetween('2026-11-27', '2026-07-01')).toBe(-149);
    expect(isoDateOfInstant(new Date('2026-11-27T23:30:00.000Z'))).toBe('2026-11-27');
  });

  it('adds years, moving 29 February to 1 March', () => {
    expect(addYears('2027-06-30', 1)).toBe('2028-06-30');
    expect(addYears('2028-02-29', 1)).toBe('2029-03-01');
  });

  it('writes a long date with the weekday', () => {
    expect(formatLongDate('2027-12-24')).toBe('Friday 24 December 2027');
  });
});

describe('site closure record ids', () => {
  it('write the day as a number and refuse a non-date', async () => {
    const { closureRecordIdOf } = await import('../../../lib/clocks/closure-id');
    expect(closureRecordIdOf('2026-12-28')).toBe(20261228);
    expect(() => closureRecordIdOf('2026-12-32')).toThrow(RangeError);
  });
});

describe('today at the site', () => {
  it('is the wall-calendar day in the site time zone, not the server’s (IANA tz database)', async () => {
    const { todayIn } = await import('../../../lib/clocks/dates');
    const evening = new Date('2026-11-26T03:30:00.000Z'); // 21:30 on 25 Nov in Chicago (UTC−6 in November)
    expect(todayIn('UTC', evening)).toBe('2026-11-26');
    expect(todayIn('America/Chicago', evening)).toBe('2026-11-25');
    expect(() => todayIn('Mars/Olympus_Mons', evening)).toThrow(RangeError);
  });
});
