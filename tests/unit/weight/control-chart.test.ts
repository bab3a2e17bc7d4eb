import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { chartConstants, constantsFor, westernElectricFlags, xBarRChart } from '@/lib/weight/control-chart';

/*
 * X̄–R constants: the table of control-chart factors of ASTM E2587 and NIST/SEMATECH e-Handbook
 * §6.3.2, checked value by value against published reprints of that table, and here also two
 * independent ways: d2 by numerical integration of the expected range of n standard normal values,
 * and A2, D3, D4 from d2 and d3. Run rules: Western Electric Statistical Quality Control Handbook
 * (1956), as given in published summaries of its four zone tests.
 */

const published: [number, number, number, number, number][] = [
  // n, A2, D3, D4, d2
  [2, 1.88, 0, 3.267, 1.128],
  [3, 1.023, 0, 2.574, 1.693],
  [4, 0.729, 0, 2.282, 2.059],
  [5, 0.577, 0, 2.114, 2.326],
  [6, 0.483, 0, 2.004, 2.534],
  [7, 0.419, 0.076, 1.924, 2.704],
  [8, 0.373, 0.136, 1.864, 2.847],
  [9, 0.337, 0.184, 1.816, 2.97],
  [10, 0.308, 0.223, 1.777, 3.078],
];

/** E[range of n N(0,1)] = ∫ 1 − Φ(x)^n − (1 − Φ(x))^n dx, trapezoid rule on [−8, 8]. */
function expectedRange(n: number): number {
  const phi = (x: number) => 0.5 * (1 + ss.errorFunction(x / Math.SQRT2));
  const h = 0.002;
  let sum = 0;
  for (let x = -8; x <= 8; x += h) {
    const p = phi(x);
    sum += (1 - p ** n - (1 - p) ** n) * h;
  }
  return sum;
}

describe('X̄–R constants for n = 2…10 (NIST/SEMATECH §6.3.2, ASTM E2587)', () => {
  it.each(published)('n = %i: A2 %f, D3 %f, D4 %f, d2 %f', (n, a2, d3Factor, d4, d2) => {
    const c = constantsFor(n);
    expect(c).toMatchObject({ n, a2, lowerR: d3Factor, upperR: d4, d2 });
  });

  it.each(published)('n = %i: d2 matches the expected range of n normal values', (n) => {
    expect(Math.abs(expectedRange(n) - constantsFor(n).d2)).toBeLessThan(0.0015);
  });

  it.each(published)('n = %i: A2 = 3/(d2·√n), D3 = max(0, 1 − 3·d3/d2), D4 = 1 + 3·d3/d2', (n) => {
    const c = chartConstants[n]!;
    // The table rounds d2 and d3 to three places, so the derived factors agree to a few thousandths.
    expect(Math.abs(c.a2 - 3 / (c.d2 * Math.sqrt(n)))).toBeLessThan(0.002);
    expect(Math.abs(c.upperR - (1 + (3 * c.d3) / c.d2))).toBeLessThan(0.003);
    expect(Math.abs(c.lowerR - Math.max(0, 1 - (3 * c.d3) / c.d2))).toBeLessThan(0.003);
  });

  it('refuses subgroup sizes outside the table', () => {
    expect(() => constantsFor(1)).toThrow(RangeError);
    expect(() => constantsFor(11)).toThrow(/2 to 10/);
  });
});

describe('Western Electric run rules (WE Handbook, 1956), centre 0, σ 1', () => {
  const flags = (values: number[]) => westernElectricFlags(values, 0, 1);

  it('rule 1: a point beyond 3σ, either side; exactly 3σ is not beyond', () => {
    // The last point is on 3σ (no rule 1) but completes 2 of 3 beyond 2σ with the 3.1 (rule 2).
    expect(flags([0, 3.1, -3.2, 3])).toEqual([[], [1], [1], [2]]);
  });

  it('rule 2: 2 of 3 successive points beyond 2σ on the same side', () => {
    expect(flags([2.1, 0, 2.1])).toEqual([[], [], [2]]);
    expect(flags([2.1, 0, 0, 2.1])).toEqual([[], [], [], []]);
    expect(flags([-2.1, -2.5])).toEqual([[], [2]]);
    // Opposite sides are not a signal.
    expect(flags([2.1, -2.1, 0])).toEqual([[], [], []]);
  });

  it('rule 3: 4 of 5 successive points beyond 1σ on the same side', () => {
    expect(flags([1.1, 1.1, 0, 1.1, 1.1])).toEqual([[], [], [], [], [3]]);
    expect(flags([1.1, 1.1, 0, 0, 1.1, 1.1])).toEqual([[], [], [], [], [], []]);
    expect(flags([-1.5, -1.5, -1.5, -1.5])[3]).toEqual([3]);
  });

  it('rule 4: 8 successive points on the same side of the centre line', () => {
    const eight = Array(8).fill(0.5) as number[];
    expect(flags(eight)[7]).toEqual([4]);
    expect(flags(eight)[6]).toEqual([]);
    expect(flags([...Array(7).fill(-0.5), 0.5]).flat()).toEqual([]);
    expect(flags([...Array(7).fill(-0.5), 0]).flat()).toEqual([]);
  });
});

describe('X̄–R chart across checks', () => {
  it('computes limits with A2, D3, D4 for the subgroup size', () => {
    // n = 5: means 100, 102, 98; ranges 4, 6, 5 → X̿ = 100, R̄ = 5.
    const chart = xBarRChart([
      { label: 'a', values: [98, 99, 100, 101, 102] },
      { label: 'b', values: [99, 101, 102, 103, 105] },
      { label: 'c', values: [95.5, 97, 98, 99, 100.5] },
    ])!;
    expect(chart.n).toBe(5);
    expect(chart.grandMean).toBeCloseTo(100, 10);
    expect(chart.meanRange).toBeCloseTo(5, 10);
    expect(chart.xbar.upper).toBeCloseTo(100 + 0.577 * 5, 10);
    expect(chart.xbar.lower).toBeCloseTo(100 - 0.577 * 5, 10);
    expect(chart.r).toEqual({ centre: 5, lower: 0, upper: 2.114 * 5 });
    expect(chart.sigma).toBeCloseTo(5 / 2.326, 10);
    expect(chart.points.map((p) => p.mean)).toEqual([100, 102, 98]);
  });

  it('uses the first 10 units of larger checks and the smallest size present', () => {
    const twenty = Array.from({ length: 20 }, (_, i) => 100 + i);
    expect(xBarRChart([{ label: 'a', values: twenty }])!.n).toBe(10);
    expect(xBarRChart([{ label: 'a', values: twenty }])!.points[0]!.range).toBe(9);
    expect(xBarRChart([{ label: 'a', values: twenty }, { label: 'b', values: [1, 2, 3, 4, 5, 6, 7] }])!.n).toBe(7);
  });

  it('flags a shifted check and a range beyond its limit', () => {
    const steady = Array.from({ length: 10 }, (_, i) => ({ label: `c${i}`, values: [99, 100, 101, 100, 100] }));
    const chart = xBarRChart([...steady, { label: 'shift', values: [110, 111, 109, 110, 110] }, { label: 'wide', values: [90, 100, 100, 100, 110] }])!;
    const shift = chart.points.find((p) => p.label === 'shift')!;
    expect(shift.flags).toContain(1);
    expect(chart.points.find((p) => p.label === 'wide')!.rangeOut).toBe(true);
  });

  it('has no chart without a subgroup of 2, and no flags when every range is zero', () => {
    expect(xBarRChart([])).toBeNull();
    expect(xBarRChart([{ label: 'a', values: [100] }])).toBeNull();
    const flat = xBarRChart([{ label: 'a', values: [100, 100] }, { label: 'b', values: [101, 101] }])!;
    expect(flat.points.every((p) => p.flags.length === 0 && !p.rangeOut)).toBe(true);
  });
});
