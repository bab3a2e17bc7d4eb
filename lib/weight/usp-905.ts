import { beyond, mean, sampleSd } from './stats';

/*
 * USP <905> Uniformity of Dosage Units, weight variation, applied to hard capsules (text harmonised
 * with Ph. Eur. 2.9.40 and JP 6.02). Table 2 was checked against a published reproduction of it:
 * AV = |M − X̄| + k·s, k = 2.4 for 10 units and 2.0 for 30; M = X̄ clamped to 98.5…101.5 when
 * T ≤ 101.5 and to 98.5…T when T > 101.5 (T: target content at manufacture, % label claim, 100 unless
 * stated); L1 = 15.0; L2 = 25.0, no unit below (1 − 0.01·L2)M or above (1 + 0.01·L2)M. Stages (USP
 * <905> Table 3, as described in the same reproductions and ASTM E2810): 10 units, met when
 * AV ≤ L1; otherwise 20 more, met when the AV of all 30 ≤ L1 and every unit is within the L2 range.
 *
 * From memory (the chapter's weight-variation section was not reached in a published copy): each
 * unit's content is estimated from its net mass assuming even distribution, x_i = w_i × A / W̄, with
 * A the assay result (% label claim) and W̄ the mean net mass of the units in that stage.
 */

export const usp905L1 = 15.0;
export const usp905L2 = 25.0;
export const usp905Stage1Size = 10;
export const usp905Stage2Size = 30;

/** The acceptability constant k for the number of units tested (USP <905> Uniformity of Dosage Units, Table 2). */
export function usp905K(n: 10 | 30): number {
  return n === 10 ? 2.4 : 2.0;
}

export type ReferenceRule = 'mean' | 'floor' | 'ceiling';

/** Reference value M (USP <905>, Table 2): case T ≤ 101.5 and case T > 101.5. */
export function referenceValue(xBar: number, target = 100): { m: number; rule: ReferenceRule } {
  const ceiling = target <= 101.5 ? 101.5 : target;
  if (xBar < 98.5) return { m: 98.5, rule: 'floor' };
  if (xBar > ceiling) return { m: ceiling, rule: 'ceiling' };
  return { m: xBar, rule: 'mean' };
}

export interface Usp905Stage {
  stage: 1 | 2;
  n: number;
  k: number;
  xBar: number;
  s: number;
  m: number;
  rule: ReferenceRule;
  av: number;
  /** Stage 2 only: indexes of units outside (1 ± 0.01·L2)M. */
  outsideL2: number[];
  passes: boolean;
}

export interface Usp905Result {
  method: 'usp_905';
  status: 'pass' | 'fail' | 'incomplete';
  /** Units needed for the next decision: 10, or 30 once stage 1 has failed. */
  required: number;
  given: number;
  assayPercent: number;
  targetPercent: number;
  stages: Usp905Stage[];
  /** Estimated content of each unit used, % label claim. */
  contents: number[];
}

export function estimatedContents(netMg: readonly number[], assayPercent: number): number[] {
  const wBar = mean(netMg);
  return netMg.map((w) => (w * assayPercent) / wBar);
}

export function acceptanceValue(contents: readonly number[], k: number, target = 100) {
  const xBar = mean(contents);
  const s = sampleSd(contents);
  const { m, rule } = referenceValue(xBar, target);
  return { xBar, s, m, rule, av: Math.abs(m - xBar) + k * s };
}

function stage(netMg: readonly number[], n: 10 | 30, assayPercent: number, targetPercent: number): Usp905Stage {
  const contents = estimatedContents(netMg.slice(0, n), assayPercent);
  const k = usp905K(n);
  const { xBar, s, m, rule, av } = acceptanceValue(contents, k, targetPercent);
  const outsideL2: number[] = [];
  if (n === usp905Stage2Size) {
    const low = (1 - usp905L2 * 0.01) * m;
    const high = (1 + usp905L2 * 0.01) * m;
    contents.forEach((x, i) => {
      if (beyond(low, x) || beyond(x, high)) outsideL2.push(i);
    });
  }
  return { stage: n === 10 ? 1 : 2, n, k, xBar, s, m, rule, av, outsideL2, passes: !beyond(av, usp905L1) && outsideL2.length === 0 };
}

export function evaluateUsp905(netMg: readonly number[], options: { assayPercent?: number; targetPercent?: number } = {}): Usp905Result {
  const assayPercent = options.assayPercent ?? 100;
  const targetPercent = options.targetPercent ?? 100;
  const base = { method: 'usp_905' as const, given: netMg.length, assayPercent, targetPercent };
  if (netMg.length < usp905Stage1Size) {
    return { ...base, status: 'incomplete', required: usp905Stage1Size, stages: [], contents: [] };
  }
  const first = stage(netMg, 10, assayPercent, targetPercent);
  if (first.passes) {
    return { ...base, status: 'pass', required: usp905Stage1Size, stages: [first], contents: estimatedContents(netMg.slice(0, 10), assayPercent) };
  }
  if (netMg.length < usp905Stage2Size) {
    return { ...base, status: 'incomplete', required: usp905Stage2Size, stages: [first], contents: estimatedContents(netMg.slice(0, 10), assayPercent) };
  }
  const second = stage(netMg, 30, assayPercent, targetPercent);
  return {
    ...base,
    status: second.passes ? 'pass' : 'fail',
    required: usp905Stage2Size,
    stages: [first, second],
    contents: estimatedContents(netMg.slice(0, 30), assayPercent),
  };
}
