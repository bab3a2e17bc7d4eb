import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { beyond, countOutside, cp, cpk, mean, median, percentDeviation, sampleSd, summarize } from '@/lib/weight/stats';
import { mulberry32 } from '@/scripts/seed/prng';

/*
 * Descriptive statistics, cross-checked against the simple-statistics package (an independent
 * implementation from the npm registry). Cpk/Cp formulas: NIST/SEMATECH e-Handbook §6.1.6.
 */

const rand = mulberry32(2905);
const samples = Array.from({ length: 12 }, (_, i) => Array.from({ length: 2 + i * 3 }, () => 300 + rand() * 60));

describe('mean, SD, median against simple-statistics', () => {
  it.each(samples.map((s, i) => [i, s] as const))('sample %i agrees', (_i, values) => {
    expect(mean(values)).toBeCloseTo(ss.mean(values), 10);
    expect(sampleSd(values)).toBeCloseTo(ss.sampleStandardDeviation(values), 10);
    expect(median(values)).toBeCloseTo(ss.median(values), 10);
    expect(median(values)).toBeCloseTo(ss.quantile(values, 0.5), 10);
    const s = summarize(values);
    expect(s.min).toBe(ss.min(values));
    expect(s.max).toBe(ss.max(values));
    expect(s.range).toBeCloseTo(ss.max(values) - ss.min(values), 10);
    expect(s.rsd).toBeCloseTo((ss.sampleStandardDeviation(values) / ss.mean(values)) * 100, 10);
  });

  it('uses the n − 1 divisor (sample SD), not n', () => {
    // 2, 4, 4, 4, 5, 5, 7, 9: population SD 2, sample SD √(32/7).
    expect(sampleSd([2, 4, 4, 4, 5, 5, 7, 9])).toBeCloseTo(Math.sqrt(32 / 7), 12);
  });

  it('gives NaN where a statistic is undefined', () => {
    expect(mean([])).toBeNaN();
    expect(sampleSd([5])).toBeNaN();
    expect(median([])).toBeNaN();
    expect(summarize([]).count).toBe(0);
    expect(summarize([]).mean).toBeNaN();
    expect(median([3, 1, 2])).toBe(2);
  });
});

describe('limits and capability', () => {
  const limits = { targetMg: 500, lowerMg: 462.5, upperMg: 537.5 };

  it('counts units strictly outside the product limits; a unit on a limit is inside', () => {
    expect(countOutside([462.5, 537.5, 500], limits)).toEqual({ below: 0, above: 0 });
    expect(countOutside([462.49, 537.51, 537.6, 500], limits)).toEqual({ below: 1, above: 2 });
  });

  it('Cpk = min(USL − μ, μ − LSL) / 3σ (NIST/SEMATECH §6.1.6)', () => {
    // μ = 510, σ = 5: (537.5 − 510)/15 = 1.8333; centred μ = 500: 37.5/15 = 2.5 = Cp.
    expect(cpk(510, 5, 462.5, 537.5)).toBeCloseTo(27.5 / 15, 12);
    expect(cpk(490, 5, 462.5, 537.5)).toBeCloseTo(27.5 / 15, 12);
    expect(cpk(500, 5, 462.5, 537.5)).toBeCloseTo(cp(5, 462.5, 537.5), 12);
    expect(cp(5, 462.5, 537.5)).toBeCloseTo(2.5, 12);
    expect(cpk(540, 5, 462.5, 537.5)).toBeLessThan(0);
  });

  it('has no capability without a positive σ', () => {
    expect(cpk(500, 0, 462.5, 537.5)).toBeNaN();
    expect(cpk(500, Number.NaN, 462.5, 537.5)).toBeNaN();
    expect(cp(0, 462.5, 537.5)).toBeNaN();
  });

  it('"more than" a limit does not count a value that lands on it after rounding', () => {
    // (110 − 100)/100 × 100 and similar land on the limit only up to binary rounding.
    expect(beyond(percentDeviation(220, 200), 10)).toBe(false);
    expect(beyond(percentDeviation(322.5, 300), 7.5)).toBe(false);
    expect(beyond(percentDeviation(322.51, 300), 7.5)).toBe(true);
  });
});
