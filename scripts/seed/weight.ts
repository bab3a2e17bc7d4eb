import { assertCan } from '../../lib/auth/permissions';
import { writeTransaction } from '../../lib/records/transaction';
import { buildWeightCheckRow, insertWeightCheck } from '../../lib/weight-checks/commands';
import { getWeightBatch } from '../../lib/weight-checks/queries';
import { type CapsuleSize, type WeightMethod, defaultMethod, xBarRChart } from '../../lib/weight';
import { type Prng, mulberry32 } from './prng';
import type { DemoScenario } from './scenario';
import type { StoryStep } from './story';

/*
 * Demo weight checks: the batches of the last three weeks of the scenario get a check about every
 * 50 minutes of their manufacturing day, 20 capsules each, normally distributed around the target
 * (RSD about 1.6 %). Two batches tell a story: one recent batch has a light check that fails (the
 * auger had slowed), and another has a check whose mean sits far above the others while it still
 * passes, a Western Electric rule 1 signal on the X̄ chart. Deterministic: a seeded generator and
 * fixed times.
 */

export const weightSeedFrom = '2026-11-09';
const checksPerBatch = 8;
const unitsPerCheck = 20;
const relativeSd = 0.016;

/*
 * Typical empty-shell masses by size, in mg (from memory of shell makers' catalogues; used only to
 * make demo gross masses look plausible).
 */
const shellMassMg: Record<CapsuleSize, number> = { '000': 163, '00': 118, '0': 96, '1': 76, '2': 61, '3': 48, '4': 38, '5': 28 };

const recorders = ['operator@brackwater.example', 'operator2@brackwater.example', 'supervisor@brackwater.example'] as const;

export interface PlannedCheck {
  lotNumber: string;
  checkedAt: Date;
  method: WeightMethod;
  massMode: 'gross' | 'net';
  shellMassMg: number | null;
  massesMg: number[];
  recordedByEmail: (typeof recorders)[number];
  note: string | null;
  /** Which story the check tells, for the tests that keep the demo honest. */
  story: 'routine' | 'light_fail' | 'shift_signal';
}

function normal(rand: Prng): number {
  // Box–Muller; 1 − u keeps the logarithm finite.
  const u = 1 - rand();
  const v = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

const round = (n: number, places: number) => Math.round(n * 10 ** places) / 10 ** places;

export function planDemoWeightChecks(scenario: DemoScenario): PlannedCheck[] {
  const rand = mulberry32(20261109);
  const products = new Map(scenario.products.map((p) => [p.code, p]));
  const chosen = scenario.batches.filter((b) => b.manufacturedOn >= weightSeedFrom).sort((a, b) => a.lotNumber.localeCompare(b.lotNumber));
  const open = chosen.filter((b) => b.status === 'in_process');
  const failLot = open[open.length - 1]?.lotNumber;
  const signalLot = open[open.length - 2]?.lotNumber;
  const planned: PlannedCheck[] = [];
  chosen.forEach((batch, batchIndex) => {
    const p = products.get(batch.productCode)!;
    const gross = p.shellMaterial === 'gelatin';
    const shell = shellMassMg[p.capsuleSize];
    const start = Date.parse(`${batch.manufacturedOn}T06:30:00.000Z`) + (batch.lotNumber.endsWith('-B') ? 25 * 60_000 : 0);
    for (let i = 0; i < checksPerBatch; i++) {
      let story: PlannedCheck['story'] = 'routine';
      let centre = p.targetFillMg;
      if (batch.lotNumber === failLot && i === checksPerBatch - 1) {
        story = 'light_fail';
        centre = p.targetFillMg * 0.91;
      } else if (batch.lotNumber === signalLot && i === 5) {
        story = 'shift_signal';
        centre = p.targetFillMg * 1.03;
      }
      const net = Array.from({ length: unitsPerCheck }, () => round(centre * (1 + relativeSd * normal(rand)), 1));
      const masses = gross ? net.map((m) => round(m + shell + 2 * normal(rand), 1)) : net;
      planned.push({
        lotNumber: batch.lotNumber,
        checkedAt: new Date(start + i * 50 * 60_000),
        method: defaultMethod(p.regulatoryClass),
        massMode: gross ? 'gross' : 'net',
        shellMassMg: gross ? shell : null,
        massesMg: masses,
        recordedByEmail: recorders[(batchIndex + i) % recorders.length]!,
        note: story === 'light_fail' ? 'Auger seemed slow after the hopper was topped up.' : null,
        story,
      });
    }
  });
  return planned;
}

/** The X̄–R chart of one lot's planned checks, as the page draws it (for the demo's own tests). */
export function plannedChart(planned: readonly PlannedCheck[], lotNumber: string) {
  return xBarRChart(
    planned
      .filter((c) => c.lotNumber === lotNumber)
      .map((c) => ({ label: c.checkedAt.toISOString(), values: c.massesMg.map((m) => m - (c.shellMassMg ?? 0)) })),
  );
}

/*
 * Each check is recorded by the person who weighed it, at the time they weighed it, with the
 * building blocks of recordWeightCheck (lib/weight-checks/commands.ts): the same evaluation, row
 * and audit entry. recordWeightCheck itself takes only batches still in process or on hold, and the
 * demo's batches are entered with the status they end the scenario in (there is no batch release
 * command yet), so most of these batches read as released already when their checks are replayed.
 */
export function weightCheckSteps(scenario: DemoScenario): StoryStep[] {
  return planDemoWeightChecks(scenario).map((c) => ({
    at: c.checkedAt.toISOString(),
    what: `weight check on ${c.lotNumber} by ${c.recordedByEmail}`,
    async run(ctx) {
      const person = ctx.person(c.recordedByEmail);
      assertCan(person, 'weight_check.record');
      await writeTransaction(async (tx) => {
        const batch = await getWeightBatch(ctx.id(ctx.batchIds, c.lotNumber, 'batch'), tx);
        if (!batch) throw new Error(`demo batch ${c.lotNumber} is missing`);
        const { values } = buildWeightCheckRow(
          batch,
          { batchId: batch.id, method: c.method, massMode: c.massMode, shellMassMg: c.shellMassMg, massesMg: c.massesMg, assayPercent: null, targetPercent: null, note: c.note },
          person.id,
          c.checkedAt,
        );
        await insertWeightCheck(tx, person, values);
      });
    },
  }));
}
