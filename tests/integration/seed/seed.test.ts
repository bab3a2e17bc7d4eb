import { and, count, eq, like } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connect } from '@/db/client';
import { auditEntries, batches, capsuleDefects, fillingRings, machines, products, settings, users } from '@/db/schema';
import { seedBulkBatches } from '@/scripts/seed/bulk';
import { SeedRefusedError, seedAuditAction, seedDemo } from '@/scripts/seed/index';
import { demoPassword } from '@/scripts/seed/demo-users';
import { buildDemoScenario } from '@/scripts/seed/scenario';
import { verifyAuditChain } from '@/lib/audit';
import { demoClosures } from '@/scripts/seed/clocks';
import { verifyPassword } from '@/lib/auth/passwords';
import { testStack } from '../../helpers/env';

/*
 * The integration database is migrated and seeded by `npm test` through seedDemo (scripts/services/
 * database.ts), before any test runs. These tests read back what that run wrote.
 */

type Admin = Awaited<ReturnType<typeof connect>>;
let admin: Admin;
const scenario = buildDemoScenario();

/** The values a row was created with, from its "created (demo data)" audit entry. */
async function createdWithAll(recordType: string): Promise<Map<number, Record<string, unknown>>> {
  const rows = await admin.db
    .select({ recordId: auditEntries.recordId, changes: auditEntries.changes })
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.action, seedAuditAction)));
  return new Map(
    rows.map((r) => [
      r.recordId,
      Object.fromEntries((JSON.parse(r.changes) as { field: string; to: unknown }[]).map((c) => [c.field, c.to])),
    ]),
  );
}
const createdWith = async (recordType: string, id: number) => (await createdWithAll(recordType)).get(id);

beforeAll(async () => {
  admin = await connect(testStack.adminDatabaseUrl);
});
afterAll(async () => {
  await admin.db.delete(batches).where(like(batches.lotNumber, 'BWX-%'));
  await admin.conn.end();
});

describe('demo seed in the database', () => {
  it('loaded every demo user with the documented password (bcrypt)', async () => {
    for (const u of scenario.users) {
      const [row] = await admin.db.select().from(users).where(eq(users.email, u.email));
      expect(row, u.email).toMatchObject({ name: u.name, title: u.title, role: u.role, active: true });
      expect(row!.passwordHash).toMatch(/^\$2[aby]\$10\$/);
      expect(await verifyPassword(demoPassword, row!.passwordHash)).toBe(true);
    }
  });

  it('loaded the master data as the scenario describes it', async () => {
    // Other test files add machines, rings and defects of their own and move records through their
    // lifecycles, so this checks the demo's rows by their identity and reads the values they were
    // created with (status, condition, shipped units) from their creation audit entries.
    const productRows = await admin.db.select().from(products);
    for (const p of scenario.products) {
      const row = productRows.find((r) => r.code === p.code);
      expect(row, p.code).toMatchObject({ name: p.name, capsuleSize: p.capsuleSize, shellMaterial: p.shellMaterial, regulatoryClass: p.regulatoryClass });
      expect(Number(row!.targetFillMg)).toBe(p.targetFillMg);
      expect(Number(row!.fillLowerMg)).toBe(p.fillLowerMg);
      expect(Number(row!.fillUpperMg)).toBe(p.fillUpperMg);
    }

    const machineRows = await admin.db.select().from(machines);
    for (const m of scenario.machines) {
      expect(machineRows.find((r) => r.assetTag === m.assetTag), m.assetTag).toMatchObject({
        name: m.name,
        room: m.room,
        model: m.model,
        capsuleSizes: m.capsuleSizes.join(','),
      });
    }

    const ringRows = await admin.db
      .select({ id: fillingRings.id, serial: fillingRings.serial, size: fillingRings.capsuleSize, machine: machines.assetTag })
      .from(fillingRings)
      .innerJoin(machines, eq(machines.id, fillingRings.machineId));
    for (const r of scenario.rings) {
      const row = ringRows.find((x) => x.serial === r.serial);
      expect(row, r.serial).toMatchObject({ size: r.capsuleSize, machine: r.machineAssetTag });
      expect(await createdWith('filling_ring', row!.id), r.serial).toMatchObject({
        status: r.status,
        condition: r.condition,
        statusReason: r.statusReason,
        retiredAt: r.retiredAt,
      });
    }

    const defectRows = await admin.db.select().from(capsuleDefects);
    for (const d of scenario.defects) {
      expect(defectRows.find((x) => x.code === d.code), d.code).toMatchObject({ ...d });
    }

    const batchRows = await admin.db
      .select({
        id: batches.id,
        lot: batches.lotNumber,
        size: batches.sizeCapsules,
        on: batches.manufacturedOn,
        expires: batches.expiresOn,
        product: products.code,
        machine: machines.assetTag,
        ring: fillingRings.serial,
      })
      .from(batches)
      .innerJoin(products, eq(products.id, batches.productId))
      .innerJoin(machines, eq(machines.id, batches.machineId))
      .innerJoin(fillingRings, eq(fillingRings.id, batches.ringId))
      .where(like(batches.lotNumber, 'BW-2026-%'));
    expect(batchRows).toHaveLength(scenario.batches.length);
    const createdBatches = await createdWithAll('batch');
    for (const b of scenario.batches) {
      const row = batchRows.find((x) => x.lot === b.lotNumber);
      expect(row, b.lotNumber).toEqual({
        id: expect.any(Number),
        lot: b.lotNumber,
        size: b.sizeCapsules,
        on: b.manufacturedOn,
        expires: b.expiresOn,
        product: b.productCode,
        machine: b.machineAssetTag,
        ring: b.ringSerial,
      });
      expect(createdBatches.get(row!.id), b.lotNumber).toMatchObject({ status: b.status, unitsShipped: b.unitsShipped });
    }

    const settingRows = await admin.db.select({ key: settings.key, value: settings.value }).from(settings);
    expect(settingRows).toEqual(expect.arrayContaining(scenario.settings));
  });

  it('wrote one audit entry per seeded row, by the administrator, on an unbroken chain (21 CFR 11.10(e))', async () => {
    const [adminUser] = await admin.db.select().from(users).where(eq(users.email, 'admin@brackwater.example'));
    const entries = await admin.db
      .select({ recordType: auditEntries.recordType, recordId: auditEntries.recordId, userId: auditEntries.userId, userName: auditEntries.userName })
      .from(auditEntries)
      .where(eq(auditEntries.action, seedAuditAction));
    // The scenario's rows, plus what the computation seeds add: risk scale version 1, the clock
    // settings (three due-day targets and the site time zone) and the site closures.
    const clockSettings = 4;
    const expected =
      scenario.users.length +
      scenario.settings.length +
      clockSettings +
      scenario.products.length +
      scenario.machines.length +
      scenario.rings.length +
      scenario.defects.length +
      scenario.batches.length +
      1 +
      demoClosures.length;
    expect(entries).toHaveLength(expected);
    expect(entries.every((e) => e.userId === adminUser!.id && e.userName === adminUser!.name)).toBe(true);

    const perType = (t: string) => entries.filter((e) => e.recordType === t);
    expect(perType('batch')).toHaveLength(scenario.batches.length);
    expect(perType('filling_ring')).toHaveLength(scenario.rings.length);
    expect(perType('risk_scale')).toHaveLength(1);
    expect(perType('site_closure')).toHaveLength(demoClosures.length);
    expect(perType('setting')).toHaveLength(scenario.settings.length + clockSettings);
    // Each batch row has its own entry, not several on one id.
    expect(new Set(perType('batch').map((e) => e.recordId)).size).toBe(scenario.batches.length);

    expect(await admin.db.transaction((tx) => verifyAuditChain(tx))).toEqual({ ok: true, entries: expect.any(Number) });
  });

  it('refuses to seed a database that already has users, and changes nothing', async () => {
    const before = await admin.db.select({ n: count() }).from(batches);
    await expect(seedDemo(testStack.adminDatabaseUrl)).rejects.toBeInstanceOf(SeedRefusedError);
    const after = await admin.db.select({ n: count() }).from(batches);
    expect(after).toEqual(before);
    const [admins] = await admin.db.select({ n: count() }).from(users).where(eq(users.email, 'admin@brackwater.example'));
    expect(admins!.n).toBe(1);
  });
});

describe('bulk synthetic batches', () => {
  it('inserts many batches in chunks, numbering on from an earlier run, each on a ring that fits its product', async () => {
    const started = performance.now();
    const first = await seedBulkBatches(testStack.adminDatabaseUrl, 4_500);
    const second = await seedBulkBatches(testStack.adminDatabaseUrl, 10);
    const seconds = (performance.now() - started) / 1000;

    expect(first).toEqual({ inserted: 4_500, firstLot: 'BWX-0000001' });
    expect(second).toEqual({ inserted: 10, firstLot: 'BWX-0004501' });
    const [n] = await admin.db.select({ n: count() }).from(batches).where(like(batches.lotNumber, 'BWX-%'));
    expect(n!.n).toBe(4_510);
    // Multi-row inserts: thousands of rows take seconds, not minutes (row-by-row would be far slower).
    expect(seconds).toBeLessThan(20);

    const mismatched = await admin.db
      .select({ n: count() })
      .from(batches)
      .innerJoin(products, eq(products.id, batches.productId))
      .innerJoin(fillingRings, eq(fillingRings.id, batches.ringId))
      .where(and(like(batches.lotNumber, 'BWX-%'), eq(fillingRings.status, 'retired')));
    expect(mismatched[0]!.n).toBe(0);
    const rows = await admin.db
      .select({ productSize: products.capsuleSize, ringSize: fillingRings.capsuleSize, ringMachine: fillingRings.machineId, machine: batches.machineId })
      .from(batches)
      .innerJoin(products, eq(products.id, batches.productId))
      .innerJoin(fillingRings, eq(fillingRings.id, batches.ringId))
      .where(like(batches.lotNumber, 'BWX-%'));
    expect(rows.every((r) => r.productSize === r.ringSize && r.ringMachine === r.machine)).toBe(true);
    expect(await admin.db.transaction((tx) => verifyAuditChain(tx))).toMatchObject({ ok: true });
  });
});
