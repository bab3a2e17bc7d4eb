import { describe, expect, it } from 'vitest';
import {
  addMonths,
  defaultTrendRange,
  firstDayOf,
  isRepeatLot,
  lastDayOf,
  maxTrendMonths,
  monthLabel,
  monthTrends,
  monthsInRange,
  parseTrendRange,
  ratePerMillion,
  round2,
} from '@/lib/complaints/trending-math';
import { ValidationError } from '@/lib/errors';

/*
 * Complaint trending arithmetic. Rates per million units shipped and the denominators are common
 * practice in complaint trending; the month limit is the u-chart for nonconformities per unit with
 * variable sample size (Montgomery, Introduction to Statistical Quality Control — from memory):
 * UCL = ū + 3·√(ū / n). Every expected value below was worked by hand and is shown beside it.
 */

function fieldErrorsOf(fn: () => unknown): Record<string, string[]> {
  try {
    fn();
  } catch (err) {
    if (err instanceof ValidationError) return err.fieldErrors;
    throw err;
  }
  throw new Error('expected a ValidationError');
}

describe('rate per million units shipped (common practice)', () => {
  it('divides complaints by units and scales to a million', () => {
    expect(ratePerMillion(3, 1_500_000)).toBe(2); // 3 / 1.5 M = 2.00
    expect(ratePerMillion(1, 300_000)).toBe(3.33); // 1 / 0.3 M = 3.333… → 3.33
    expect(ratePerMillion(2, 150_000)).toBe(13.33); // 2 / 0.15 M = 13.333… → 13.33
    expect(ratePerMillion(0, 500_000)).toBe(0);
  });

  it('rounds half away from zero at two decimals', () => {
    expect(ratePerMillion(1, 1_600_000)).toBe(0.63); // 0.625 → 0.63
    expect(round2(1.005)).toBe(1.01); // binary 1.005 is 1.00499…; the exponent form still gives 1.01
    expect(round2(-2.345)).toBe(-2.35);
  });

  it('gives no rate when no units are shipped on record', () => {
    expect(ratePerMillion(2, 0)).toBeNull();
    expect(ratePerMillion(0, 0)).toBeNull();
  });
});

describe('repeat lots (the complaint procedure: more than one complaint on a lot is flagged)', () => {
  it('flags two complaints and not one', () => {
    expect(isRepeatLot(1)).toBe(false);
    expect(isRepeatLot(2)).toBe(true);
    expect(isRepeatLot(0)).toBe(false);
  });
});

describe('months', () => {
  it('lists every month of a range across a year end', () => {
    expect(monthsInRange({ from: '2025-11', to: '2026-02' })).toEqual(['2025-11', '2025-12', '2026-01', '2026-02']);
    expect(monthsInRange({ from: '2026-03', to: '2026-03' })).toEqual(['2026-03']);
    expect(monthsInRange({ from: '2026-04', to: '2026-03' })).toEqual([]);
  });

  it('adds months and finds first and last days (Gregorian leap years)', () => {
    expect(addMonths('2026-01', -1)).toBe('2025-12');
    expect(addMonths('2026-12', 1)).toBe('2027-01');
    expect(addMonths('2026-07', -17)).toBe('2025-02');
    expect(firstDayOf('2026-07')).toBe('2026-07-01');
    expect(lastDayOf('2028-02')).toBe('2028-02-29'); // divisible by 4
    expect(lastDayOf('2100-02')).toBe('2100-02-28'); // century not divisible by 400
    expect(lastDayOf('2026-12')).toBe('2026-12-31');
    expect(monthLabel('2026-07')).toBe('Jul 2026');
  });

  it('refuses a month that is not YYYY-MM', () => {
    expect(() => addMonths('2026-13', 1)).toThrow(RangeError);
  });

  it('defaults to the twelve months ending with the site’s current month', () => {
    expect(defaultTrendRange('2026-12-02')).toEqual({ from: '2026-01', to: '2026-12' });
    expect(defaultTrendRange('2026-01-31', 3)).toEqual({ from: '2025-11', to: '2026-01' });
  });
});

describe('month signal: u-chart upper limit over the previous six months (Montgomery, from memory)', () => {
  const million = 1_000_000;
  const baseline = [1, 2, 1, 2, 1, 3].map((complaints, i) => ({ month: addMonths('2030-01', i), complaints, units: million }));

  it('signals a month above ū + 3·√(ū/n)', () => {
    const series = [...baseline, { month: '2030-07', complaints: 4, units: 500_000 }];
    const [july] = monthTrends(series, '2030-07');
    // ū = 10 complaints / 6 M units = 1.6667 per million; n = 0.5 M
    // UCL = 1.6667 + 3·√(1.6667 / 0.5) = 1.6667 + 3·1.8257 = 7.1439 → 7.14; rate = 4 / 0.5 = 8.00
    expect(july).toMatchObject({ ratePerMillion: 8, baselineRate: 1.67, upperLimit: 7.14, signal: true });
    expect(july?.note).toMatch(/Above the upper limit/);
  });

  it('moves the baseline one month on and does not signal a month under its limit', () => {
    const series = [...baseline, { month: '2030-07', complaints: 4, units: 500_000 }, { month: '2030-08', complaints: 3, units: million }];
    const [, august] = monthTrends(series, '2030-07');
    // baseline Feb–Jul: 2+1+2+1+3+4 = 13 complaints over 5.5 M units → ū = 2.3636
    // UCL = 2.3636 + 3·√(2.3636 / 1) = 2.3636 + 4.6122 = 6.9758 → 6.98; rate 3.00
    expect(august).toMatchObject({ ratePerMillion: 3, baselineRate: 2.36, upperLimit: 6.98, signal: false, note: null });
  });

  it('returns only the months from the first one shown', () => {
    const series = [...baseline, { month: '2030-07', complaints: 0, units: million }];
    expect(monthTrends(series, '2030-06').map((m) => m.month)).toEqual(['2030-06', '2030-07']);
  });

  it('leaves out baseline months without units, and needs three months with units', () => {
    const series = [
      { month: '2030-01', complaints: 1, units: 0 },
      { month: '2030-02', complaints: 2, units: million },
      { month: '2030-03', complaints: 0, units: 0 },
      { month: '2030-04', complaints: 1, units: million },
      { month: '2030-05', complaints: 9, units: million },
    ];
    const [may] = monthTrends(series, '2030-05');
    expect(may).toMatchObject({ ratePerMillion: 9, baselineRate: null, upperLimit: null, signal: false });
    expect(may?.note).toMatch(/Fewer than 3 of the previous 6 months/);
  });

  it('sets no limit on a baseline without complaints, so one complaint is not a signal', () => {
    const series = [0, 0, 0, 0, 0, 0, 1].map((complaints, i) => ({ month: addMonths('2030-01', i), complaints, units: million }));
    const [july] = monthTrends(series, '2030-07');
    expect(july).toMatchObject({ ratePerMillion: 1, baselineRate: 0, upperLimit: null, signal: false });
    expect(july?.note).toMatch(/No complaints in the previous 6 months/);
  });

  it('gives no rate and no signal for a month whose lots shipped nothing on record', () => {
    const series = [...baseline, { month: '2030-07', complaints: 5, units: 0 }];
    const [july] = monthTrends(series, '2030-07');
    expect(july).toMatchObject({ complaints: 5, ratePerMillion: null, upperLimit: null, signal: false });
    expect(july?.note).toMatch(/No units shipped on record/);
  });

  it('uses only the six months before, not older ones', () => {
    // Jan has 30 complaints, but Aug's baseline is Feb–Jul (one complaint a month), so Jan cannot raise it
    const series = [
      { month: '2030-01', complaints: 30, units: million },
      ...[1, 1, 1, 1, 1, 1].map((complaints, i) => ({ month: addMonths('2030-02', i), complaints, units: million })),
      { month: '2030-08', complaints: 6, units: million },
    ];
    const [august] = monthTrends(series, '2030-08');
    // ū = 6 / 6 M = 1.00; UCL = 1 + 3·√1 = 4.00; rate 6.00 → signal
    expect(august).toMatchObject({ baselineRate: 1, upperLimit: 4, signal: true });
  });
});

describe('range in the URL', () => {
  const today = '2026-12-02';

  it('defaults to the last twelve months', () => {
    expect(parseTrendRange({}, today)).toEqual({ from: '2026-01', to: '2026-12' });
    expect(parseTrendRange({ from: '', to: '' }, today)).toEqual({ from: '2026-01', to: '2026-12' });
  });

  it('fills a missing end or start', () => {
    expect(parseTrendRange({ from: '2026-05' }, today)).toEqual({ from: '2026-05', to: '2026-12' });
    expect(parseTrendRange({ from: '2027-03' }, today)).toEqual({ from: '2027-03', to: '2027-03' });
    expect(parseTrendRange({ to: '2026-06' }, today)).toEqual({ from: '2025-07', to: '2026-06' });
    expect(parseTrendRange({ from: ['2026-02', '2026-03'], to: ' 2026-04 ' }, today)).toEqual({ from: '2026-02', to: '2026-04' });
  });

  it('names the bad parameter', () => {
    expect(fieldErrorsOf(() => parseTrendRange({ from: '2026-13' }, today))).toHaveProperty('from');
    expect(fieldErrorsOf(() => parseTrendRange({ to: 'July' }, today))).toHaveProperty('to');
    expect(fieldErrorsOf(() => parseTrendRange({ from: '1999-12', to: '2000-01' }, today))).toHaveProperty('from');
    expect(fieldErrorsOf(() => parseTrendRange({ from: '2026-05', to: '2026-04' }, today)).to?.[0]).toMatch(/same month as From or later/);
  });

  it(`refuses more than ${maxTrendMonths} months`, () => {
    expect(parseTrendRange({ from: '2022-01', to: '2026-12' }, today)).toEqual({ from: '2022-01', to: '2026-12' });
    expect(fieldErrorsOf(() => parseTrendRange({ from: '2021-12', to: '2026-12' }, today)).to?.[0]).toMatch(/at most 60 months/);
    expect(fieldErrorsOf(() => parseTrendRange({ from: '2001-01' }, today))).toHaveProperty('from');
  });
});
