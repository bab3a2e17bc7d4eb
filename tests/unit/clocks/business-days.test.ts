import { describe, expect, it } from 'vitest';
import {
  addBusinessDays,
  businessDaysBetween,
  federalCalendar,
  isBusinessDay,
  makeCalendar,
  nonBusinessReason,
} from '../../../lib/clocks/business-days';

// Business days = Monday–Friday less observed federal holidays (5 U.S.C. 6103) less site closures.
const shutdown = makeCalendar([
  { day: '2026-12-28', description: 'Plant shutdown' },
  { day: '2026-12-29', description: 'Plant shutdown' },
  { day: '2026-12-30', description: 'Plant shutdown' },
  { day: '2026-12-31', description: 'Plant shutdown' },
  { day: '2026-12-25', description: 'Also a closure' },
]);

describe('business-day arithmetic', () => {
  it('says why a day is not a business day', () => {
    expect(nonBusinessReason('2026-11-28', federalCalendar)).toEqual({ kind: 'weekend', label: 'Saturday' });
    expect(nonBusinessReason('2026-11-26', federalCalendar)).toEqual({ kind: 'federal_holiday', label: 'Thanksgiving Day' });
    expect(nonBusinessReason('2026-07-03', federalCalendar)).toEqual({
      kind: 'federal_holiday',
      label: 'Independence Day (observed)',
    });
    expect(nonBusinessReason('2026-12-29', shutdown)).toEqual({ kind: 'site_closure', label: 'Plant shutdown' });
    // A federal holiday that is also a site closure is reported as the holiday.
    expect(nonBusinessReason('2026-12-25', shutdown)?.kind).toBe('federal_holiday');
    expect(isBusinessDay('2026-12-29', federalCalendar)).toBe(true);
    expect(isBusinessDay('2026-12-29', shutdown)).toBe(false);
  });

  it('does not count the start day (day 0) and gives it back for n = 0', () => {
    expect(addBusinessDays('2026-11-20', 0, federalCalendar)).toBe('2026-11-20');
    expect(addBusinessDays('2026-11-21', 1, federalCalendar)).toBe('2026-11-23'); // from a Saturday
    expect(addBusinessDays('2026-11-20', 1, federalCalendar)).toBe('2026-11-23'); // Friday → Monday
  });

  it('skips Thanksgiving but not the day after it (not a 6103(a) holiday)', () => {
    expect(addBusinessDays('2026-11-25', 1, federalCalendar)).toBe('2026-11-27');
    expect(addBusinessDays('2026-11-25', 2, federalCalendar)).toBe('2026-11-30');
  });

  it('skips a site closure week and the holidays around it', () => {
    // 24 Dec (1); 25 Christmas; 28–31 shutdown; 1 Jan New Year's Day; 4 Jan (2); 5 Jan (3).
    expect(addBusinessDays('2026-12-23', 3, shutdown)).toBe('2027-01-05');
    expect(addBusinessDays('2026-12-23', 3, federalCalendar)).toBe('2026-12-29');
  });

  it('counts business days between two dates, negative backwards', () => {
    expect(businessDaysBetween('2026-11-20', '2026-12-01', federalCalendar)).toBe(6);
    expect(businessDaysBetween('2026-12-01', '2026-11-20', federalCalendar)).toBe(-6);
    expect(businessDaysBetween('2026-11-20', '2026-11-20', federalCalendar)).toBe(0);
    expect(businessDaysBetween('2026-12-23', '2027-01-05', shutdown)).toBe(3);
  });

  it('is the inverse of addBusinessDays on business days', () => {
    for (let n = 0; n <= 40; n++) {
      const end = addBusinessDays('2026-11-01', n, shutdown);
      expect(businessDaysBetween('2026-11-01', end, shutdown)).toBe(n);
    }
  });

  it('refuses a negative or fractional number of days', () => {
    expect(() => addBusinessDays('2026-11-20', -1, federalCalendar)).toThrow(RangeError);
    expect(() => addBusinessDays('2026-11-20', 1.5, federalCalendar)).toThrow(RangeError);
  });
});
