import { and, asc, count, desc, eq, inArray, like, lte } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, connect } from '@/db/client';
import { auditEntries, batches, capsuleDefects, fillingRings, machines, products, settings, siteClosures, users } from '@/db/schema';
import { verifyAuditChain } from '@/lib/audit';
import { verifyPassword } from '@/lib/auth/passwords';
import { seedBulkBatches } from '@/scripts/seed/bulk';
import { demoClosures } from '@/scripts/seed/clocks';
import { demoPassword } from '@/scripts/seed/demo-users';
import { SeedRefusedError, seedAuditAction, seedDemo } from '@/scripts/seed/index';
import { seedCompletedKey, seedStartedKey } from '@/scripts/seed/markers';
import { buildDemoScenario, scenarioEnd, scenarioStart } from '@/scripts/seed/scenario';
import { prepareDatabase } from '@/scripts/services/database';
import { Teardown } from '@/scripts/services/processes';
import { testStack } from '../../helpers/env';

/*
 * The integration database is migrated and seeded by `npm test` (scripts/services/database.ts)
 * through the product's own write path, before any test runs. These tests read back what that run
 * wrote. Other test files add rows of their own and move records on, so the demo's rows are found by
 * their identity and their state at the end of the scenario is read from the audit trail, whose
 * demo entries carry the scenario's dates and every later one the day the tests ran.
 */

type Admin = Awaited<ReturnType<typeof connect>>;
let admin: Admin;
const scenario = buildDemoScenario();
// Audit times are stored as UTC text (lib/audit/hash.ts sqlUtc), which sorts as time does.
const scenarioOver = `${scenarioEnd} 23:59:59.999`;

/** The values a row was created with, from its creation audit entry (`action`). */
async function createdWithAll(recordType: string, action: string): Promise<Map<number, Record<string, unknown>>> {
  const rows = await admin.db
    .select({ recordId: auditEntries.recordId, changes: auditEntries.changes })
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.action, action)));
  return new Map(
    rows.map((r) => [
      r.recordId,
      Object.fromEntries((JSON.parse(r.changes) as { field: string; to: unknown }[]).map((c) => [c.field, c.to])),
    ]),
  );
}

/** A record's fields as the demo left them: every change the audit trail holds up to the scenario's end, in order. */
async function asTheDemoLeftIt(recordType: string, recordId: number): Promise<Record<string, unknown>> {
  const rows = await admin.db
    .select({ changes: auditEntries.changes })
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.recordId, recordId), lte(auditEntries.at, scenarioOver)))
    .orderBy(asc(auditEntries.id));
  const state: Record<string, unknown> = {};
  for (const r of rows) for (const c of JSON.parse(r.changes) as { field: string; to: unknown }[]) state[c.field] = c.to;
  return state;
}

beforeAll(async () => {
  admin = await connect(testStack.adminDatabaseUrl);
});
afterAll(async () => {
  await admin.db.delete(batches).where(like(batches.lotNumber, 'BWX-%'));
  await admin.conn.end();
  await closeDb();
});

describe('demo seed in the database', () => {
  it('loaded every demo user with the documented password (bcrypt), each chosen by its holder, none left to change', async () => {
    const [adminUser] = await admin.db.select().from(users).where(eq(users.email, 'admin@brackwater.example'));
    const created = await createdWithAll('user', 'user_created');
    for (const u of scenario.users) {
      const [row] = await admin.db.select().from(users).where(eq(users.email, u.email));
      expect(row, u.email).toMatchObject({ name: u.name, title: u.title, role: u.role, active: true, mustChangePassword: false });
      expect(row!.passwordHash).toMatch(/^\$2[aby]\$10\$/);
      expect(await verifyPassword(demoPassword, row!.passwordHash)).toBe(true);
      if (u.role === 'admin') continue;
      // EU GMP Annex 11 §12.3: creating access is recorded; the person then replaces the administrator's password.
      expect(created.get(row!.id), u.email).toMatchObject({ email: u.email, role: u.role, mustChangePassword: true });
      const changed = await admin.db
        .select({ userId: auditEntries.userId })
        .from(auditEntries)
        .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, row!.id), eq(auditEntries.action, 'password_changed')));
      expect(changed.map((c) => c.userId), u.email).toEqual([row!.id]);
    }
    const [firstEntry] = await admin.db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, adminUser!.id), eq(auditEntries.action, seedAuditAction)));
    expect(firstEntry).toMatchObject({ userId: adminUser!.id, userName: adminUser!.name });
  });

  it('loaded the master data as the scenario describes it', async () => {
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

    const defectRows = await admin.db.select().from(capsuleDefects);
    for (const d of scenario.defects) {
      expect(defectRows.find((x) => x.code === d.code), d.code).toMatchObject({ ...d });
    }

    const settingRows = await admin.db.select({ key: settings.key, value: settings.value }).from(settings);
    expect(settingRows).toEqual(expect.arrayContaining(scenario.settings));
    const closureRows = await admin.db.select({ day: siteClosures.day, description: siteClosures.description }).from(siteClosures);
    expect(closureRows).toEqual(expect.arrayContaining(demoClosures.map((c) => ({ ...c }))));
  });

  it('registered the rings in service through the product and retired the cracked one as its story says', async () => {
    const ringRows = await admin.db
      .select({ id: fillingRings.id, serial: fillingRings.serial, size: fillingRings.capsuleSize, machine: machines.assetTag })
      .from(fillingRings)
      .innerJoin(machines, eq(machines.id, fillingRings.machineId));
    const registered = await createdWithAll('filling_ring', 'create');
    for (const r of scenario.rings) {
      const row = ringRows.find((x) => x.serial === r.serial);
      expect(row, r.serial).toMatchObject({ size: r.capsuleSize, machine: r.machineAssetTag });
      expect(registered.get(row!.id), r.serial).toMatchObject({ status: 'in_service' });
      const left = await asTheDemoLeftIt('filling_ring', row!.id);
      // The write path's clock runs on from the step's time by the milliseconds the step takes.
      const minute = (v: unknown) => (typeof v === 'string' ? v.slice(0, 16) : (v ?? null));
      // A value the trail never changed from empty is not in it.
      expect({ statusReason: null, ...left, retiredAt: minute(left.retiredAt) }, r.serial).toMatchObject({
        status: r.status,
        condition: r.condition,
        statusReason: r.statusReason,
        retiredAt: minute(r.retiredAt),
      });
    }
  });

  it('left every batch in the status the scenario gives it, the held ones moved there by their deviations', async () => {
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
    const entered = await createdWithAll('batch', seedAuditAction);
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
      expect(entered.get(row!.id), b.lotNumber).toMatchObject({ unitsShipped: b.unitsShipped });
      expect((await asTheDemoLeftIt('batch', row!.id)).status, b.lotNumber).toBe(b.status);
    }
    // The held ones came in as in process and reached their status through a deviation's hold and disposition.
    const moved = await admin.db
      .selectDistinct({ recordId: auditEntries.recordId })
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'batch'), inArray(auditEntries.action, ['hold', 'disposition']), lte(auditEntries.at, scenarioOver)));
    expect(moved.length).toBeGreaterThanOrEqual(scenario.batches.filter((b) => b.status === 'on_hold' || b.status === 'rejected').length);
  });

  it('dated the demo between the scenario’s first and last day, on an unbroken chain (21 CFR 11.10(e))', async () => {
    const demoEntries = await admin.db
      .select({ at: auditEntries.at, action: auditEntries.action })
      .from(auditEntries)
      .where(lte(auditEntries.id, (await seedMarkerEntryId(seedCompletedKey))!));
    const stories = demoEntries.filter((e) => e.action !== 'demo_seed_started' && e.action !== 'demo_seed_completed');
    expect(stories.length).toBeGreaterThan(500);
    expect(stories.every((e) => e.at >= `${scenarioStart} 00:00:00.000` && e.at <= scenarioOver)).toBe(true);
    expect(await admin.db.transaction((tx) => verifyAuditChain(tx))).toEqual({ ok: true, entries: expect.any(Number) });
  });

  it('marked its start before anything else and its end after everything else (a half-loaded demo is recognisable)', async () => {
    const started = await seedMarkerEntryId(seedStartedKey);
    const completed = await seedMarkerEntryId(seedCompletedKey);
    const [first] = await admin.db.select({ id: auditEntries.id }).from(auditEntries).orderBy(asc(auditEntries.id)).limit(1);
    expect(started).toBe(first!.id);
    const [lastStory] = await admin.db
      .select({ id: auditEntries.id })
      .from(auditEntries)
      .where(lte(auditEntries.at, scenarioOver))
      .orderBy(desc(auditEntries.id))
      .limit(1);
    expect(completed).toBeGreaterThan(lastStory!.id);
  });

  it('refuses to seed a database that already has users, and changes nothing', async () => {
    const before = await admin.db.select({ n: count() }).from(batches);
    await expect(seedDemo()).rejects.toBeInstanceOf(SeedRefusedError);
    const after = await admin.db.select({ n: count() }).from(batches);
    expect(after).toEqual(before);
    const [admins] = await admin.db.select({ n: count() }).from(users).where(eq(users.email, 'admin@brackwater.example'));
    expect(admins!.n).toBe(1);
  });
});

async function seedMarkerEntryId(key: string): Promise<number | undefined> {
  const rows = await admin.db
    .select({ id: auditEntries.id, changes: auditEntries.changes })
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'setting'), inArray(auditEntries.action, ['demo_seed_started', 'demo_seed_completed'])));
  return rows.find((r) => (JSON.parse(r.changes) as { field: string }[]).some((c) => c.field === key))?.id;
}

describe('a demo seed that stopped half-way', () => {
  const keep = async <T>(work: () => Promise<T>): Promise<T> => {
    // Made to look half-way by hiding the end marker, which is put back as it was.
    const [marker] = await admin.db.select().from(settings).where(eq(settings.key, seedCompletedKey));
    await admin.db.delete(settings).where(eq(settings.key, seedCompletedKey));
    try {
      return await work();
    } finally {
      await admin.db.insert(settings).values(marker!);
    }
  };
  const options = () => ({
    adminUrl: testStack.adminDatabaseUrl,
    appUrl: testStack.databaseUrl,
    // A seed that ran would fail at once on this: the tests below expect none to run.
    seedEnv: { PATH: process.env.PATH, NODE_ENV: 'test' as const },
    teardown: new Teardown(() => {}),
  });

  it('is refused by the seed itself, which says so', async () => {
    await keep(() => expect(seedDemo()).rejects.toThrow(/started on this database and did not finish/));
  });

  it('stops the start with an explanation when the database may not be re-created', async () => {
    await keep(() => expect(prepareDatabase(options())).rejects.toThrow(/stopped half-way/));
  });

  it('is re-created for the demo, never kept', async () => {
    const log: string[] = [];
    class Recreated extends Error {}
    await keep(() =>
      expect(
        prepareDatabase({
          ...options(),
          log: (l) => log.push(l),
          recreateDatabase: () => {
            throw new Recreated('re-created');
          },
        }),
      ).rejects.toBeInstanceOf(Recreated),
    );
    expect(log.join('\n')).toMatch(/only partly loaded/);
  });

  it('is not mistaken for a complete demo, which is kept as it is', async () => {
    expect(await prepareDatabase(options())).toBe('kept');
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
