import { describe, expect, it } from 'vitest';
import { defaultMethod, evaluateWeightCheck, type WeightCheckInput } from '@/lib/weight/evaluate';
import { sampleWithMean } from './helpers';

/*
 * A whole weight check: pharmacopoeial test plus the product's own limits (site limits, common
 * practice), as the page and the server evaluate it. Rule sources as in the per-chapter tests.
 */

const product = { targetMg: 500, lowerMg: 462.5, upperMg: 537.5 };
const base: WeightCheckInput = { method: 'ph_eur_2_9_5', massMode: 'net', massesMg: [], shellMassMg: null, product };

describe('evaluating a weight check', () => {
  it('defaults supplements to USP <2091> and drugs to Ph. Eur. 2.9.5', () => {
    expect(defaultMethod('supplement')).toBe('usp_2091');
    expect(defaultMethod('drug')).toBe('ph_eur_2_9_5');
  });

  it('passes a uniform Ph. Eur. 2.9.5 sample inside the product limits', () => {
    const e = evaluateWeightCheck({ ...base, massesMg: sampleWithMean(500, [510, 490]) });
    expect(e.verdict).toBe('pass');
    expect(e.rules.map((r) => [r.id, r.status])).toEqual([
      ['ph_eur_limit', 'pass'],
      ['ph_eur_double', 'pass'],
      ['product_mean', 'pass'],
      ['product_units', 'pass'],
    ]);
    expect(e.hints).toEqual([]);
    expect(e.cpk).toBeGreaterThan(1);
  });

  it('subtracts the mean shell mass from gross masses (Ph. Eur. 2.9.5 weighs content mass)', () => {
    const e = evaluateWeightCheck({ ...base, massMode: 'gross', shellMassMg: 96, massesMg: sampleWithMean(596, []) });
    expect(e.netMg[0]).toBeCloseTo(500, 9);
    expect(e.verdict).toBe('pass');
  });

  it('stops without a shell mass, or when a gross mass is not above it', () => {
    expect(evaluateWeightCheck({ ...base, massMode: 'gross', massesMg: [600] }).problems[0]).toMatch(/shell mass/);
    const e = evaluateWeightCheck({ ...base, massMode: 'gross', shellMassMg: 96, massesMg: [90, 600] });
    expect(e).toMatchObject({ verdict: 'incomplete', rules: [] });
    expect(e.problems[0]).toMatch(/not more than the shell/);
  });

  it('is incomplete with no masses or too few', () => {
    expect(evaluateWeightCheck(base).verdict).toBe('incomplete');
    const e = evaluateWeightCheck({ ...base, massesMg: [500, 500] });
    expect(e.verdict).toBe('incomplete');
    expect(e.rules[0]).toMatchObject({ id: 'ph_eur_sample', status: 'incomplete' });
  });

  it('fails a light batch on the product limits even when uniform, with "light" hints (common practice)', () => {
    const e = evaluateWeightCheck({ ...base, massesMg: sampleWithMean(455, []) });
    expect(e.rules.find((r) => r.id === 'ph_eur_limit')!.status).toBe('pass');
    expect(e.rules.find((r) => r.id === 'product_mean')!.status).toBe('fail');
    expect(e.outside).toEqual({ below: 20, above: 0 });
    expect(e).toMatchObject({ verdict: 'fail', direction: 'light' });
    expect(e.hints[0]!.text).toMatch(/speed the auger up/);
  });

  it('fails Ph. Eur. 2.9.5 with 3 units beyond 7.5 %, spread hints when the mean is on target', () => {
    const e = evaluateWeightCheck({ ...base, product: { targetMg: 500, lowerMg: 400, upperMg: 600 }, massesMg: sampleWithMean(500, [540, 540, 460]) });
    expect(e.rules.find((r) => r.id === 'ph_eur_limit')).toMatchObject({ status: 'fail', detail: expect.stringMatching(/^3 units outside 7\.5 %/) });
    expect(e).toMatchObject({ verdict: 'fail', direction: 'spread' });
    const double = evaluateWeightCheck({ ...base, product: { targetMg: 500, lowerMg: 400, upperMg: 600 }, massesMg: sampleWithMean(500, [580]) });
    expect(double.rules.find((r) => r.id === 'ph_eur_double')).toMatchObject({ status: 'fail', detail: expect.stringMatching(/^1 unit outside/) });
  });

  it('USP <905>: stage 1 not met sends the check on to stage 2 rather than failing it', () => {
    const first10 = [...Array(5).fill(470), ...Array(5).fill(530)] as number[];
    const wide = { ...base, method: 'usp_905' as const, product: { targetMg: 500, lowerMg: 400, upperMg: 600 } };
    const e = evaluateWeightCheck({ ...wide, massesMg: first10 });
    expect(e.rules.map((r) => [r.id, r.status]).slice(0, 2)).toEqual([
      ['usp905_stage1', 'next_stage'],
      ['usp905_stage2_needed', 'incomplete'],
    ]);
    expect(e.verdict).toBe('incomplete');
    const thirty = evaluateWeightCheck({ ...wide, massesMg: [...first10, ...Array(20).fill(500)] });
    expect(thirty.rules[1]).toMatchObject({ id: 'usp905_stage2', status: 'pass' });
    expect(thirty.verdict).toBe('pass');
    expect(evaluateWeightCheck({ ...wide, massesMg: [500] }).rules[0]!.id).toBe('usp905_sample');
    const failed = evaluateWeightCheck({ ...wide, massesMg: Array.from({ length: 30 }, (_, i) => (i % 2 ? 440 : 560)) });
    expect(failed.rules[1]).toMatchObject({ id: 'usp905_stage2', status: 'fail' });
    expect(evaluateWeightCheck({ ...wide, massesMg: Array(10).fill(500), assayPercent: 97 }).rules[0]!.detail).toMatch(/= \|98\.50 − 97\.00\| \+ 2\.4 × 0\.00 = 1\.50/);
  });

  it('USP <2091> Weight Variation of Dietary Supplements, Hard Shell Capsules: screen, stage 1 and stage 2 rules', () => {
    const s2091 = { ...base, method: 'usp_2091' as const, product: { targetMg: 400, lowerMg: 300, upperMg: 500 } };
    const screened = evaluateWeightCheck({ ...s2091, massMode: 'gross', shellMassMg: 100, massesMg: sampleWithMean(500, []) });
    expect(screened.rules[0]).toMatchObject({ id: 'usp2091_screen', status: 'pass' });
    expect(screened.verdict).toBe('pass');
    const toNet = evaluateWeightCheck({ ...s2091, massMode: 'gross', shellMassMg: 100, massesMg: sampleWithMean(500, [560]) });
    expect(toNet.rules.slice(0, 2).map((r) => [r.id, r.status])).toEqual([
      ['usp2091_screen', 'next_stage'],
      ['usp2091_stage1', 'pass'],
    ]);
    const more = evaluateWeightCheck({ ...s2091, massesMg: sampleWithMean(400, [441, 359, 441]) });
    expect(more.rules.map((r) => [r.id, r.status]).slice(0, 2)).toEqual([
      ['usp2091_stage1', 'next_stage'],
      ['usp2091_stage2_needed', 'incomplete'],
    ]);
    const sixty = evaluateWeightCheck({ ...s2091, massesMg: [...sampleWithMean(400, [441, 359, 441]), ...sampleWithMean(400, [], 40)] });
    expect(sixty.rules.slice(0, 2).map((r) => [r.id, r.status])).toEqual([
      ['usp2091_stage1', 'next_stage'],
      ['usp2091_stage2', 'pass'],
    ]);
    expect(evaluateWeightCheck({ ...s2091, massesMg: [400] }).rules[0]!.id).toBe('usp2091_sample');
    expect(evaluateWeightCheck({ ...s2091, massesMg: sampleWithMean(400, [501]) }).verdict).toBe('fail');
  });
});
