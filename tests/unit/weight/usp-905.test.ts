import { describe, expect, it } from 'vitest';
import { acceptanceValue, estimatedContents, evaluateUsp905, referenceValue, usp905K, usp905L1, usp905L2 } from '@/lib/weight/usp-905';
import { sampleSd } from '@/lib/weight/stats';

/*
 * USP <905> Uniformity of Dosage Units (harmonised with Ph. Eur. 2.9.40, JP 6.02), Table 2, checked
 * against a published reproduction: AV = |M − X̄| + k·s, k = 2.4 for n = 10 and 2.0 for n = 30,
 * L1 = 15.0, L2 = 25.0; reference value M by case T ≤ 101.5 / T > 101.5. Contents estimated as
 * x_i = w_i × A / W̄ (from memory of the weight-variation section).
 */

const fiveAndFive = (centre: number, d: number) => [...Array(5).fill(centre - d), ...Array(5).fill(centre + d)] as number[];

describe('USP <905> constants', () => {
  it('k = 2.4 for 10 units and 2.0 for 30; L1 = 15.0; L2 = 25.0', () => {
    expect(usp905K(10)).toBe(2.4);
    expect(usp905K(30)).toBe(2.0);
    expect(usp905L1).toBe(15.0);
    expect(usp905L2).toBe(25.0);
  });
});

describe('USP <905> reference value M, case T ≤ 101.5', () => {
  it.each([
    [97, 98.5, 'floor'],
    [98.5, 98.5, 'mean'],
    [100, 100, 'mean'],
    [101.5, 101.5, 'mean'],
    [103, 101.5, 'ceiling'],
  ] as const)('X̄ = %f gives M = %f (%s)', (xBar, m, rule) => {
    expect(referenceValue(xBar, 100)).toEqual({ m, rule });
    expect(referenceValue(xBar, 101.5)).toEqual({ m, rule });
  });
});

describe('USP <905> reference value M, case T > 101.5 (T = 105)', () => {
  it.each([
    [97, 98.5, 'floor'],
    [103, 103, 'mean'],
    [105, 105, 'mean'],
    [106, 105, 'ceiling'],
  ] as const)('X̄ = %f gives M = %f (%s)', (xBar, m, rule) => {
    expect(referenceValue(xBar, 105)).toEqual({ m, rule });
  });
});

describe('USP <905> acceptance value from weights', () => {
  it('estimates contents as w_i × A / W̄ (from memory)', () => {
    expect(estimatedContents([90, 110], 98)).toEqual([88.2, 107.8]);
  });

  it('AV = k·s when X̄ is within 98.5–101.5 (A = 100)', () => {
    const masses = fiveAndFive(500, 25); // contents 95 and 105 % of label claim
    const s = Math.sqrt((10 * 25) / 9);
    const r = acceptanceValue(estimatedContents(masses, 100), 2.4);
    expect(r.s).toBeCloseTo(s, 10);
    expect(r.rule).toBe('mean');
    expect(r.av).toBeCloseTo(2.4 * s, 10);
  });

  it('AV = (98.5 − X̄) + k·s when X̄ is below 98.5 (A = 96)', () => {
    const contents = estimatedContents(fiveAndFive(500, 25), 96);
    const r = acceptanceValue(contents, 2.4, 100);
    expect(r.m).toBe(98.5);
    expect(r.av).toBeCloseTo(2.5 + 2.4 * sampleSd(contents), 10);
  });

  it('AV = (X̄ − 101.5) + k·s when X̄ is above 101.5 and T ≤ 101.5 (A = 103)', () => {
    const contents = estimatedContents(fiveAndFive(500, 25), 103);
    const r = acceptanceValue(contents, 2.4, 100);
    expect(r.m).toBe(101.5);
    expect(r.av).toBeCloseTo(1.5 + 2.4 * sampleSd(contents), 10);
  });

  it('AV = k·s for X̄ between 98.5 and T when T > 101.5 (T = 105, A = 103)', () => {
    const contents = estimatedContents(fiveAndFive(500, 25), 103);
    const r = acceptanceValue(contents, 2.4, 105);
    expect(r.rule).toBe('mean');
    expect(r.av).toBeCloseTo(2.4 * sampleSd(contents), 10);
  });

  it('AV = (X̄ − T) + k·s above T when T > 101.5 (T = 105, A = 107)', () => {
    const contents = estimatedContents(fiveAndFive(500, 25), 107);
    const r = acceptanceValue(contents, 2.4, 105);
    expect(r.m).toBe(105);
    expect(r.av).toBeCloseTo(2 + 2.4 * sampleSd(contents), 10);
  });
});

describe('USP <905> stages', () => {
  // s of contents exactly 6.25 gives AV = 2.4 × 6.25 = 15.0 = L1 at stage 1.
  const dEdge = 6.25 / Math.sqrt(10 / 9);

  it('stage 1 passes with AV exactly L1 = 15.0', () => {
    const r = evaluateUsp905(fiveAndFive(100, dEdge));
    expect(r.stages[0]!.av).toBeCloseTo(15, 9);
    expect(r.status).toBe('pass');
    expect(r.required).toBe(10);
  });

  it('stage 1 above L1 asks for 30 units', () => {
    const r = evaluateUsp905(fiveAndFive(100, dEdge + 0.01));
    expect(r.stages[0]!.passes).toBe(false);
    expect(r).toMatchObject({ status: 'incomplete', required: 30 });
  });

  it('needs 10 units for stage 1', () => {
    expect(evaluateUsp905([100, 100])).toMatchObject({ status: 'incomplete', required: 10, stages: [] });
  });

  it('stage 2 passes when the AV of all 30 (k = 2.0) is within L1', () => {
    // First 10: ±6.5 % → AV ≈ 16.4 (> L1). With 20 more at the mean: s = √(422.5/29), AV ≈ 7.6.
    const masses = [...fiveAndFive(100, 6.5), ...Array(20).fill(100)];
    const r = evaluateUsp905(masses);
    expect(r.stages[0]!.av).toBeGreaterThan(15);
    expect(r.stages[1]!.k).toBe(2.0);
    expect(r.stages[1]!.av).toBeCloseTo(2 * Math.sqrt(422.5 / 29), 9);
    expect(r.status).toBe('pass');
  });

  it('stage 2 fails a unit below (1 − 0.01·L2)M even when the AV is within L1', () => {
    const other = (3000 - 70) / 29;
    const masses = [70, ...Array(29).fill(other)];
    const r = evaluateUsp905(masses);
    expect(r.stages[1]!.av).toBeLessThan(15);
    expect(r.stages[1]!.outsideL2).toEqual([0]);
    expect(r.status).toBe('fail');
  });

  it('stage 2 accepts a unit exactly at 75 % of M, fails one above 125 %', () => {
    const at75 = [75, ...Array(29).fill((3000 - 75) / 29)];
    expect(evaluateUsp905(at75).stages[1]!.outsideL2).toEqual([]);
    const above = [126, ...Array(29).fill((3000 - 126) / 29)];
    expect(evaluateUsp905(above).stages[1]!.outsideL2).toEqual([0]);
  });

  it('stage 2 fails when the AV of 30 is above L1', () => {
    const masses = Array.from({ length: 30 }, (_, i) => (i % 2 === 0 ? 90 : 110));
    const r = evaluateUsp905(masses);
    expect(r.stages[1]!.av).toBeGreaterThan(15);
    expect(r.status).toBe('fail');
  });
});
