import { describe, expect, it } from 'vitest';
import { buildDemoScenario } from '@/scripts/seed/scenario';
import { planDemoWeightChecks, plannedChart } from '@/scripts/seed/weight';
import { evaluateWeightCheck } from '@/lib/weight';

/*
 * The demo weight checks tell the stories the page is shown with: a light check that fails the
 * product's limits, and a check that passes but is a Western Electric rule 1 signal (WE Handbook,
 * 1956) on its batch's X̄ chart. Everything else passes its chapter (Ph. Eur. 2.9.5 / USP <2091>).
 */

const scenario = buildDemoScenario();
const planned = planDemoWeightChecks(scenario);
const product = (lot: string) => {
  const code = scenario.batches.find((b) => b.lotNumber === lot)!.productCode;
  const p = scenario.products.find((x) => x.code === code)!;
  return { targetMg: p.targetFillMg, lowerMg: p.fillLowerMg, upperMg: p.fillUpperMg };
};
const evaluate = (c: (typeof planned)[number]) =>
  evaluateWeightCheck({ method: c.method, massMode: c.massMode, massesMg: c.massesMg, shellMassMg: c.shellMassMg, product: product(c.lotNumber) });

describe('demo weight checks', () => {
  it('are the same on every run, over several batches and weeks', () => {
    expect(planDemoWeightChecks(scenario)).toEqual(planned);
    const lots = new Set(planned.map((c) => c.lotNumber));
    expect(lots.size).toBeGreaterThanOrEqual(6);
    const days = planned.map((c) => c.checkedAt.toISOString().slice(0, 10)).sort();
    expect(days[0]! >= '2026-11-09' && days[days.length - 1]! <= '2026-11-27').toBe(true);
  });

  it('include one failing check, on an open batch, with light capsules', () => {
    const fails = planned.filter((c) => evaluate(c).verdict === 'fail');
    expect(fails.map((c) => c.story)).toEqual(['light_fail']);
    expect(evaluate(fails[0]!).direction).toBe('light');
    expect(scenario.batches.find((b) => b.lotNumber === fails[0]!.lotNumber)!.status).toBe('in_process');
  });

  it('include a passing check flagged by run rule 1 on its batch chart', () => {
    const signal = planned.find((c) => c.story === 'shift_signal')!;
    expect(evaluate(signal).verdict).toBe('pass');
    const chart = plannedChart(planned, signal.lotNumber)!;
    const point = chart.points.find((p) => p.label === signal.checkedAt.toISOString())!;
    expect(point.flags).toContain(1);
  });

  it('every other check passes', () => {
    const routine = planned.filter((c) => c.story === 'routine');
    expect(routine.every((c) => evaluate(c).verdict === 'pass')).toBe(true);
  });
});
