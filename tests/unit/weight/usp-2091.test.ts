import { describe, expect, it } from 'vitest';
import { evaluateUsp2091 } from '@/lib/weight/usp-2091';
import { sampleWithMean } from './helpers';

/*
 * USP <2091> Weight Variation of Dietary Supplements, Capsules: Hard Shell Capsules (checked
 * against the published chapter text, USP 32–NF 27 and the revision official 1 December 2019):
 * screen of 20 intact capsules at 90–110 % of the average; 20 net contents: ≤ 2 beyond 10 %, none
 * beyond 25 %; 3–6 between 10 % and 25 % → 40 more; 60: ≤ 6 beyond 10 %, none beyond 25 %.
 */

const net20 = (specials: number[]) => sampleWithMean(400, specials);

describe('USP <2091> Hard Shell Capsules, screen on 20 intact capsules', () => {
  it('passes when every gross mass is within 90–110 % of the average (on the edge counts as within)', () => {
    const gross = sampleWithMean(500, [550, 450]);
    const r = evaluateUsp2091(gross, gross.map((g) => g - 100));
    expect(r).toMatchObject({ status: 'pass', decidedBy: 'screen', stage1: null });
  });

  it('goes to net contents when a gross mass is outside 90–110 %', () => {
    const gross = sampleWithMean(500, [551]);
    const r = evaluateUsp2091(gross, gross.map((g) => g - 100));
    expect(r.screen).toMatchObject({ passes: false, outside: [0] });
    expect(r).toMatchObject({ status: 'pass', decidedBy: 'stage_1' });
  });
});

describe('USP <2091> Hard Shell Capsules, 20 net contents', () => {
  it('passes with 2 beyond 10 %', () => {
    const r = evaluateUsp2091(null, net20([441, 359]));
    expect(r.stage1!.beyondPercent).toEqual([0, 1]);
    expect(r).toMatchObject({ status: 'pass', decidedBy: 'stage_1', screen: null });
  });

  it('does not count a content exactly 10 % from the average', () => {
    expect(evaluateUsp2091(null, net20([440, 360, 440, 360])).stage1!.beyondPercent).toEqual([]);
  });

  it('asks for 40 more with 3 beyond 10 %', () => {
    expect(evaluateUsp2091(null, net20([441, 359, 441]))).toMatchObject({ status: 'incomplete', required: 60, decidedBy: 'more_units' });
  });

  it('asks for 40 more with 6 beyond 10 %, fails with 7', () => {
    expect(evaluateUsp2091(null, net20([441, 359, 441, 359, 441, 359])).status).toBe('incomplete');
    expect(evaluateUsp2091(null, net20([441, 359, 441, 359, 441, 359, 441]))).toMatchObject({ status: 'fail', decidedBy: 'stage_1' });
  });

  it('fails any content more than 25 % from the average; exactly 25 % is not more', () => {
    expect(evaluateUsp2091(null, net20([500.1]))).toMatchObject({ status: 'fail', decidedBy: 'stage_1' });
    expect(evaluateUsp2091(null, net20([500])).stage1!.beyondOuter).toEqual([]);
  });

  it('needs 20 capsules', () => {
    expect(evaluateUsp2091(null, [400, 400])).toMatchObject({ status: 'incomplete', required: 20 });
  });
});

describe('USP <2091> Hard Shell Capsules, 40 more: 60 net contents', () => {
  const first20 = net20([441, 359, 441]);
  const sixty = (specials: number[]) => [...first20, ...sampleWithMean(400, specials, 40)];

  it('passes with 6 of 60 beyond 10 %', () => {
    const r = evaluateUsp2091(null, sixty([441, 359, 441]));
    expect(r.stage2!.n).toBe(60);
    expect(r.stage2!.beyondPercent).toHaveLength(6);
    expect(r).toMatchObject({ status: 'pass', decidedBy: 'stage_2' });
  });

  it('fails with 7 of 60 beyond 10 %', () => {
    expect(evaluateUsp2091(null, sixty([441, 359, 441, 359]))).toMatchObject({ status: 'fail', decidedBy: 'stage_2' });
  });

  it('measures the 60 against their own new average, not the first 20’s', () => {
    // First 20 average 400 mg, next 40 all 430 mg: the new average is 420 mg, so 441 mg (5 %) no
    // longer counts and only 359 mg (14.5 % below) is beyond 10 %.
    const r = evaluateUsp2091(null, [...first20, ...Array<number>(40).fill(430)]);
    expect(r.stage2!.averageMg).toBeCloseTo(420, 9);
    expect(r.stage2!.beyondPercent).toEqual([1]);
    expect(r).toMatchObject({ status: 'pass', decidedBy: 'stage_2' });
  });

  it('fails with one of 60 beyond 25 %', () => {
    expect(evaluateUsp2091(null, sixty([501])).status).toBe('fail');
  });
});
