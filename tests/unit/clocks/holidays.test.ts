import { describe, expect, it } from 'vitest';
import {
  federalHolidays,
  observedFederalHoliday,
  observedHolidaysInYear,
  upcomingFederalHolidays,
} from '../../../lib/clocks/holidays';

const observed = (year: number) => Object.fromEntries(federalHolidays(year).map((h) => [h.name, h.observed]));

// 5 U.S.C. 6103(a) lists the holidays; 6103(b) and Executive Order 11582 move a Saturday holiday
// to the Friday before and a Sunday holiday to the Monday after. Each expected weekday was checked
// against the calendar.
describe('US federal holidays (5 U.S.C. 6103)', () => {
  it('2026: Independence Day on a Saturday is observed Friday 3 July', () => {
    expect(observed(2026)).toEqual({
      'New Year’s Day': '2026-01-01',
      'Birthday of Martin Luther King, Jr.': '2026-01-19', // 3rd Monday of January
      'Washington’s Birthday': '2026-02-16', // 3rd Monday of February
      'Memorial Day': '2026-05-25', // last Monday of May
      'Juneteenth National Independence Day': '2026-06-19',
      'Independence Day': '2026-07-03',
      'Labor Day': '2026-09-07', // 1st Monday of September
      'Columbus Day': '2026-10-12', // 2nd Monday of October
      'Veterans Day': '2026-11-11',
      'Thanksgiving Day': '2026-11-26', // 4th Thursday of November
      'Christmas Day': '2026-12-25',
    });
    const july = federalHolidays(2026).find((h) => h.name === 'Independence Day')!;
    expect(july.date).toBe('2026-07-04');
  });

  it('2027: Juneteenth and Christmas on Saturdays move to Fridays, Independence Day on a Sunday to Monday', () => {
    const o = observed(2027);
    expect(o['Juneteenth National Independence Day']).toBe('2027-06-18');
    expect(o['Independence Day']).toBe('2027-07-05');
    expect(o['Christmas Day']).toBe('2027-12-24');
    expect(o['Memorial Day']).toBe('2027-05-31'); // last Monday of a month with 5 Mondays
    expect(o['Thanksgiving Day']).toBe('2027-11-25');
  });

  it('New Year’s Day on a Saturday is observed on 31 December of the year before (2022 → 2021-12-31)', () => {
    expect(federalHolidays(2022)[0]).toEqual({ name: 'New Year’s Day', date: '2022-01-01', observed: '2021-12-31' });
    expect(observedFederalHoliday('2021-12-31')?.name).toBe('New Year’s Day');
    expect(observedHolidaysInYear(2022).some((h) => h.name === 'New Year’s Day')).toBe(false);
    expect(observedHolidaysInYear(2021).map((h) => h.observed)).toContain('2021-12-31');
    // 1 January 2028 is also a Saturday.
    expect(observedFederalHoliday('2027-12-31')?.date).toBe('2028-01-01');
  });

  it('2022: holidays on a Sunday move to Monday', () => {
    const o = observed(2022);
    expect(o['Juneteenth National Independence Day']).toBe('2022-06-20');
    expect(o['Christmas Day']).toBe('2022-12-26');
  });

  it('Juneteenth exists only from 2021 (Pub. L. 117-17); 2021 was observed Friday 18 June', () => {
    expect(observed(2020)['Juneteenth National Independence Day']).toBeUndefined();
    expect(federalHolidays(2020)).toHaveLength(10);
    expect(observed(2021)['Juneteenth National Independence Day']).toBe('2021-06-18');
    expect(federalHolidays(2021)).toHaveLength(11);
  });

  it('refuses years outside the supported range rather than guess', () => {
    expect(() => federalHolidays(1985)).toThrow(RangeError); // before the first MLK Day observance (1986)
    expect(() => federalHolidays(2201)).toThrow(RangeError);
    expect(() => federalHolidays(2026.5)).toThrow(RangeError);
  });

  it('is not a holiday on an ordinary day, and answers the same twice', () => {
    expect(observedFederalHoliday('2026-11-27')).toBeNull(); // the day after Thanksgiving is not in 6103(a)
    expect(federalHolidays(2026)).toBe(federalHolidays(2026));
  });

  it('lists upcoming observed holidays across a year end', () => {
    expect(upcomingFederalHolidays('2027-11-12', 4).map((h) => h.observed)).toEqual([
      '2027-11-25',
      '2027-12-24',
      '2027-12-31',
      '2028-01-17', // MLK Day 2028, 3rd Monday of January
    ]);
  });
});
