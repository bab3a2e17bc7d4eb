import { describe, expect, it } from 'vitest';
import { evaluatePhEur, phEurPercentLimit } from '@/lib/weight/ph-eur-2-9-5';
import { sampleWithMean } from './helpers';

/*
 * Ph. Eur. 2.9.5 Uniformity of mass of single-dose preparations (01/2008:20905), capsules: 20 content
 * masses; Table 2.9.5.-1: < 300 mg 10 %, ≥ 300 mg 7.5 %; ≤ 2 beyond the limit, none beyond twice it.
 */

describe('Ph. Eur. 2.9.5 percentage limit by average mass (Table 2.9.5.-1, capsules)', () => {
  it('is 10 % below 300 mg and 7.5 % from 300 mg', () => {
    expect(phEurPercentLimit(120)).toBe(10);
    expect(phEurPercentLimit(299.99)).toBe(10);
    expect(phEurPercentLimit(300)).toBe(7.5);
    expect(phEurPercentLimit(640)).toBe(7.5);
  });
});

describe('Ph. Eur. 2.9.5: not more than 2 beyond the limit, none beyond twice it', () => {
  it('passes a uniform sample', () => {
    const r = evaluatePhEur(sampleWithMean(200, []));
    expect(r).toMatchObject({ status: 'pass', percentLimit: 10, beyondLimit: [], beyondDouble: [] });
    expect(r.lowerMg).toBeCloseTo(180, 9);
    expect(r.upperDoubleMg).toBeCloseTo(240, 9);
  });

  it('does not count units exactly on the 10 % limit (average 200 mg: 180 and 220 mg)', () => {
    const r = evaluatePhEur(sampleWithMean(200, [220, 180, 220, 180]));
    expect(r.beyondLimit).toEqual([]);
    expect(r.status).toBe('pass');
  });

  it('passes with exactly 2 units beyond 10 %', () => {
    const r = evaluatePhEur(sampleWithMean(200, [221, 179]));
    expect(r.beyondLimit).toEqual([0, 1]);
    expect(r.status).toBe('pass');
  });

  it('fails with 3 units beyond 10 %', () => {
    const r = evaluatePhEur(sampleWithMean(200, [221, 221, 221]));
    expect(r.beyondLimit).toEqual([0, 1, 2]);
    expect(r.status).toBe('fail');
  });

  it('passes 2 units exactly at twice the limit (20 %: 160 and 240 mg)', () => {
    const r = evaluatePhEur(sampleWithMean(200, [240, 160]));
    expect(r.beyondLimit).toEqual([0, 1]);
    expect(r.beyondDouble).toEqual([]);
    expect(r.status).toBe('pass');
  });

  it('fails one unit beyond twice the limit even though only 1 unit exceeds the limit', () => {
    const r = evaluatePhEur(sampleWithMean(200, [240.1]));
    expect(r.beyondLimit).toEqual([0]);
    expect(r.beyondDouble).toEqual([0]);
    expect(r.status).toBe('fail');
  });

  it('applies 7.5 % from an average of 300 mg: 322.5 mg is on the limit, 322.6 mg beyond', () => {
    expect(evaluatePhEur(sampleWithMean(300, [322.5, 277.5, 322.5, 277.5])).status).toBe('pass');
    const r = evaluatePhEur(sampleWithMean(300, [322.6, 277.4, 322.6]));
    expect(r.percentLimit).toBe(7.5);
    expect(r.beyondLimit).toHaveLength(3);
    expect(r.status).toBe('fail');
    // Twice 7.5 % = 15 %: 345 mg on it, 345.1 mg beyond.
    expect(evaluatePhEur(sampleWithMean(300, [345])).beyondDouble).toEqual([]);
    expect(evaluatePhEur(sampleWithMean(300, [345.1])).status).toBe('fail');
  });

  it('gives no verdict on fewer than 20 units and uses the first 20 of more', () => {
    expect(evaluatePhEur(sampleWithMean(200, [], 19))).toMatchObject({ status: 'incomplete', given: 19, required: 20 });
    const r = evaluatePhEur([...sampleWithMean(200, []), 999]);
    expect(r).toMatchObject({ status: 'pass', given: 21 });
    expect(r.averageMg).toBeCloseTo(200, 9);
  });
});
