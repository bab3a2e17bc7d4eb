import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { batches, capsuleDefects, fillingRings, machines, products } from '@/db/schema';
import {
  getRaisableBatch,
  listDefectOptions,
  listHoldCandidates,
  searchRaisableBatches,
} from '@/lib/deviations/raise-options';

/*
 * The choices offered when raising a deviation. Sources: 21 CFR 211.192 (the investigation extends to
 * other batches that may have been affected: hence hold candidates from the same filler), 21 CFR
 * 211.100(b) (deviations recorded during production); the rest is common practice as noted.
 */

afterAll(closeDb);

const prefix = `RZ${randomBytes(3).toString('hex').toUpperCase()}`;
let machineId = 0;
let otherMachineId = 0;
let ringId = 0;
const ids: Record<string, number> = {};

async function batch(suffix: string, status: 'in_process' | 'on_hold' | 'released' | 'rejected', manufacturedOn: string, machine = machineId) {
  const [product] = await db.select({ id: products.id }).from(products).limit(1);
  const [row] = await db
    .insert(batches)
    .values({ lotNumber: `${prefix}-${suffix}`, productId: product!.id, machineId: machine, ringId, sizeCapsules: 100_000, status, manufacturedOn })
    .$returningId();
  ids[suffix] = row!.id;
}

beforeAll(async () => {
  const [m1] = await db
    .insert(machines)
    .values({ assetTag: `${prefix}-F1`, name: `Filler ${prefix} one`, room: 'Room 1', model: 'Test model', capsuleSizes: '0,1' })
    .$returningId();
  const [m2] = await db
    .insert(machines)
    .values({ assetTag: `${prefix}-F2`, name: `Filler ${prefix} two`, room: 'Room 1', model: 'Test model', capsuleSizes: '0,1' })
    .$returningId();
  machineId = m1!.id;
  otherMachineId = m2!.id;
  const [ring] = await db.insert(fillingRings).values({ serial: `${prefix}-R1`, machineId, capsuleSize: '0' }).$returningId();
  ringId = ring!.id;
  await batch('A1', 'in_process', '2026-11-20');
  await batch('A2', 'on_hold', '2026-11-18');
  await batch('A3', 'released', '2026-11-19');
  await batch('A4', 'rejected', '2026-11-19');
  await batch('B1', 'in_process', '2026-11-01');
  await batch('C1', 'in_process', '2026-11-19', otherMachineId);
});

describe('lot search', () => {
  it('finds batches by the start of the lot number, whatever the case typed, with product, filler and ring', async () => {
    const found = await searchRaisableBatches(`${prefix.toLowerCase()}-a`);
    expect(found.map((b) => b.lotNumber)).toEqual([`${prefix}-A1`, `${prefix}-A2`]);
    expect(found[0]).toMatchObject({ machineId, machineName: `Filler ${prefix} one`, ringId, ringSerial: `${prefix}-R1`, status: 'in_process' });
    expect(found[0]!.productName).toBeTruthy();
  });

  it('offers only batches in process or on hold: released and rejected batches have left the line (common practice)', async () => {
    const found = await searchRaisableBatches(prefix, { limit: 50 });
    const lots = found.map((b) => b.lotNumber);
    expect(lots).toContain(`${prefix}-A1`);
    expect(lots).toContain(`${prefix}-A2`);
    expect(lots).not.toContain(`${prefix}-A3`);
    expect(lots).not.toContain(`${prefix}-A4`);
    expect(await getRaisableBatch(ids.A3!)).toBeNull();
    expect((await getRaisableBatch(ids.A2!))?.status).toBe('on_hold');
  });

  it('matches a full scanned lot exactly and treats % and _ as plain characters', async () => {
    expect((await searchRaisableBatches(`${prefix}-B1`)).map((b) => b.id)).toEqual([ids.B1]);
    expect(await searchRaisableBatches(`${prefix}%`)).toEqual([]);
    expect(await searchRaisableBatches(`${prefix.slice(0, -1)}_-A1`)).toEqual([]);
  });

  it('lists the newest raisable batches when nothing is typed yet', async () => {
    const found = await searchRaisableBatches('', { limit: 5 });
    expect(found.length).toBeGreaterThan(0);
    expect(found.every((b) => b.status === 'in_process' || b.status === 'on_hold')).toBe(true);
  });
});

describe('hold candidates', () => {
  it('suggests other in-process or held batches from the same filler in the days before, never the batch itself (21 CFR 211.192)', async () => {
    const found = await listHoldCandidates(ids.A1!, { sinceDays: 7 });
    const lots = found.map((b) => b.lotNumber);
    expect(lots).toEqual([`${prefix}-A2`]);
  });
});

describe('defect catalogue', () => {
  it('lists active defects, critical first, each with its default classification, severity and caution', async () => {
    const defects = await listDefectOptions();
    expect(defects.length).toBeGreaterThan(0);
    const order = { critical: 0, major: 1, minor: 2 } as const;
    const ranks = defects.map((d) => order[d.defaultClassification]);
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
    for (const d of defects) {
      expect(d.defaultSeverity).toBeGreaterThanOrEqual(1);
      expect(d.defaultSeverity).toBeLessThanOrEqual(10);
    }
    // Every critical defect carries the quarantine caution the form shows (common practice: quarantine pending QA decision).
    for (const d of defects.filter((x) => x.defaultClassification === 'critical')) {
      expect(d.caution).toMatch(/\S/);
    }
  });

  it('leaves out retired catalogue entries', async () => {
    const [row] = await db
      .insert(capsuleDefects)
      .values({ code: `${prefix}-OLD`, name: `Retired ${prefix}`, description: 'No longer used', defaultClassification: 'minor', defaultSeverity: 2, active: false })
      .$returningId();
    expect((await listDefectOptions()).some((d) => d.id === row!.id)).toBe(false);
    await db.update(capsuleDefects).set({ active: true }).where(eq(capsuleDefects.id, row!.id));
    try {
      expect((await listDefectOptions()).some((d) => d.id === row!.id)).toBe(true);
    } finally {
      // Other tests and the demo read the same catalogue: leave the test entry retired.
      await db.update(capsuleDefects).set({ active: false }).where(eq(capsuleDefects.id, row!.id));
    }
  });
});
