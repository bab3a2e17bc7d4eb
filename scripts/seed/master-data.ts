import type { Tx } from '../../db/client';
import { batches, capsuleDefects, machines, products, settings, users } from '../../db/schema';
import { type AuditActor, writeAudit } from '../../lib/audit';
import { hashPassword } from '../../lib/auth/passwords';
import { recordedAt } from '../../lib/clock';
import { defaultDueDays } from '../../lib/clocks/due-dates';
import { quarantineRing, registerRing, retireRing } from '../../lib/equipment/commands';
import { writeTransaction } from '../../lib/records/transaction';
import type { RecordType } from '../../lib/records/types';
import { publishRiskScales } from '../../lib/risk-scales/commands';
import { defaultRiskScales } from '../../lib/risk/scales';
import { addSiteClosure, updateDueDays } from '../../lib/site-calendar/commands';
import { siteTimeZoneKey } from '../../lib/site-calendar/queries';
import { changeOwnPassword, createUser } from '../../lib/users/commands';
import { riskScalesToFields } from '../../lib/validation/risk';
import { demoClosures, demoSiteTimeZone } from './clocks';
import { demoPassword } from './demo-users';
import { firstRiskScaleNote } from './risk';
import { type BatchSeed, type DemoScenario, scenarioStart } from './scenario';
import { type SeedContext, type StoryStep, iso } from './story';

/*
 * The site as Brackwater set Plumbline up on the first day of the scenario. Where the product has a
 * command, the seed uses it: the administrator creates the other accounts (each person then replaces
 * the temporary password with their own, the published demo password), publishes version 1 of the
 * risk scales, sets the closure targets, enters the site closures and registers the filling rings.
 * What has no command yet is inserted here with its "created (demo data)" entry in the audit trail,
 * so the hash chain covers it: the first administrator (someone has to create the others), the
 * products, machines, defect catalogue, a few settings, and the batches, entered on the morning of
 * the day each was made.
 */

export const seedAuditAction = 'created (demo data)';

/** When the site was set up: the scenario's first morning. */
export const setupAt = iso(`${scenarioStart}T06:00`);

/*
 * Shown to nobody and replaced at once: the administrator's choice when creating each account,
 * which the person changes to their own at their first sign-in, as every new account must.
 */
const firstSignInPassword = 'brackwater-first-sign-in';

const decimal = (n: number) => n.toFixed(2);
const minutesAfter = (isoTime: string, minutes: number) => new Date(Date.parse(isoTime) + minutes * 60_000);

function createdEntry(tx: Tx, actor: AuditActor, recordType: RecordType, recordId: number, values: Record<string, unknown>) {
  return writeAudit(tx, {
    actor,
    recordType,
    recordId,
    action: seedAuditAction,
    changes: Object.entries(values).map(([field, to]) => ({ field, from: null, to })),
  });
}

/** The administrator, then everyone else through the administration commands. */
export async function loadPeople(ctx: SeedContext, scenario: DemoScenario): Promise<void> {
  const [admin, ...others] = [...scenario.users].sort((a, b) => Number(b.role === 'admin') - Number(a.role === 'admin'));
  if (!admin || admin.role !== 'admin') throw new Error('the demo scenario has no administrator');

  const adminHash = await hashPassword(demoPassword);
  await recordedAt(new Date(setupAt), () =>
    writeTransaction(async (tx) => {
      const values = { email: admin.email, name: admin.name, title: admin.title, role: admin.role, passwordHash: adminHash };
      const [row] = await tx.insert(users).values(values).$returningId();
      ctx.people.set(admin.email, { id: row!.id, email: admin.email, name: admin.name, title: admin.title, role: admin.role });
      const { passwordHash: _hash, ...audited } = values;
      await createdEntry(tx, { id: row!.id, name: admin.name }, 'user', row!.id, { ...audited, active: true });
    }),
  );
  const actor = ctx.person(admin.email);

  for (const [i, u] of others.entries()) {
    const created = await recordedAt(minutesAfter(setupAt, 5 + i), () =>
      createUser(actor, { name: u.name, email: u.email, title: u.title, role: u.role, password: firstSignInPassword }),
    );
    ctx.people.set(u.email, { id: created.id, email: u.email, name: u.name, title: u.title, role: u.role });
  }
  // Each person's first sign-in, that afternoon: the password becomes their own.
  for (const [i, u] of others.entries()) {
    const me = ctx.person(u.email);
    await recordedAt(minutesAfter(iso(`${scenarioStart}T13:00`), 7 * i), () =>
      changeOwnPassword(me, { currentPassword: firstSignInPassword, newPassword: demoPassword, confirmPassword: demoPassword }),
    );
  }
}

export async function loadMasterData(ctx: SeedContext, scenario: DemoScenario): Promise<void> {
  const admin = ctx.person(scenario.users.find((u) => u.role === 'admin')!.email);
  const auditActor = { id: admin.id, name: admin.name };
  let minute = 20;
  const next = () => minutesAfter(setupAt, minute++);

  await recordedAt(next(), () =>
    writeTransaction(async (tx) => {
      for (const s of [...scenario.settings, { key: siteTimeZoneKey, value: demoSiteTimeZone }]) {
        await tx.insert(settings).values(s);
        // Settings are keyed by name, not by number; the key is named in the change instead.
        await createdEntry(tx, auditActor, 'setting', 0, { [s.key]: s.value });
      }
      for (const p of scenario.products) {
        const values = {
          code: p.code,
          name: p.name,
          strength: p.strength,
          capsuleSize: p.capsuleSize,
          shellMaterial: p.shellMaterial,
          regulatoryClass: p.regulatoryClass,
          targetFillMg: decimal(p.targetFillMg),
          fillLowerMg: decimal(p.fillLowerMg),
          fillUpperMg: decimal(p.fillUpperMg),
          tappedDensityGPerMl: p.tappedDensityGPerMl.toFixed(3),
        };
        const [row] = await tx.insert(products).values(values).$returningId();
        ctx.productIds.set(p.code, row!.id);
        await createdEntry(tx, auditActor, 'product', row!.id, values);
      }
      for (const m of scenario.machines) {
        const values = { assetTag: m.assetTag, name: m.name, room: m.room, model: m.model, capsuleSizes: m.capsuleSizes.join(',') };
        const [row] = await tx.insert(machines).values(values).$returningId();
        ctx.machineIds.set(m.assetTag, row!.id);
        await createdEntry(tx, auditActor, 'machine', row!.id, values);
      }
      for (const d of scenario.defects) {
        const [row] = await tx.insert(capsuleDefects).values(d).$returningId();
        ctx.defectIds.set(d.code, row!.id);
        await createdEntry(tx, auditActor, 'capsule_defect', row!.id, { ...d });
      }
    }),
  );

  await recordedAt(next(), () =>
    publishRiskScales(admin, { ...riskScalesToFields(defaultRiskScales), basedOnVersion: '0', note: firstRiskScaleNote }),
  );
  await recordedAt(next(), () =>
    updateDueDays(admin, { ...defaultDueDays, reason: 'Closure targets for the site (common practice: critical 15, major and minor 30 days).' }),
  );
  for (const c of demoClosures) await recordedAt(next(), () => addSiteClosure(admin, c));

  for (const r of scenario.rings) {
    // A ring the story retires was in service, in good condition, until then.
    const condition = r.retirement ? 'good' : r.condition;
    const { record } = await recordedAt(next(), () =>
      registerRing(admin, { serial: r.serial, machineId: ctx.id(ctx.machineIds, r.machineAssetTag, 'machine'), capsuleSize: r.capsuleSize, condition }),
    );
    ctx.ringIds.set(r.serial, record.id);
    ctx.track(`ring:${r.serial}`, record);
  }
}

/** A ring the story takes out of service: quarantined from the line, retired by a QA approver. */
export function ringSteps(scenario: DemoScenario): StoryStep[] {
  return scenario.rings.flatMap((r): StoryStep[] => {
    const story = r.retirement;
    if (!story) return [];
    const key = `ring:${r.serial}`;
    return [
      {
        at: story.quarantined.at,
        what: `quarantine ring ${r.serial}`,
        async run(ctx) {
          const ring = ctx.record(key);
          const { record } = await quarantineRing(ctx.person(story.quarantined.by), {
            id: ring.id,
            version: ring.version,
            reason: story.quarantined.reason,
            condition: r.condition,
          });
          ctx.track(key, record);
        },
      },
      {
        at: r.retiredAt!,
        what: `retire ring ${r.serial}`,
        async run(ctx) {
          const ring = ctx.record(key);
          const { record } = await retireRing(
            ctx.person(story.retiredBy),
            { id: ring.id, version: ring.version, reason: r.statusReason! },
            await ctx.signer(story.retiredBy),
          );
          ctx.track(key, record);
        },
      },
    ];
  });
}

/*
 * Batches come in from the site's records on the morning each is made. There is no command for a
 * batch's release yet, so each is entered with the status it has at the end of the scenario, except
 * those a demo deviation holds: they were in process when it held them, and the deviation's own
 * events put them on hold and release or reject them.
 */
export function batchSteps(scenario: DemoScenario, heldByDeviations: ReadonlySet<string>): StoryStep[] {
  const admin = scenario.users.find((u) => u.role === 'admin')!;
  const byDay = new Map<string, BatchSeed[]>();
  for (const b of scenario.batches) byDay.set(b.manufacturedOn, [...(byDay.get(b.manufacturedOn) ?? []), b]);
  return [...byDay.entries()].map(([day, list]) => ({
    at: iso(`${day}T05:30`),
    what: `enter the batches made on ${day}`,
    async run(ctx) {
      const actor = ctx.person(admin.email);
      await writeTransaction(async (tx) => {
        for (const b of list) {
          const values = {
            lotNumber: b.lotNumber,
            productId: ctx.id(ctx.productIds, b.productCode, 'product'),
            machineId: ctx.id(ctx.machineIds, b.machineAssetTag, 'machine'),
            ringId: ctx.id(ctx.ringIds, b.ringSerial, 'ring'),
            sizeCapsules: b.sizeCapsules,
            unitsShipped: b.unitsShipped,
            status: heldByDeviations.has(b.lotNumber) ? ('in_process' as const) : b.status,
            manufacturedOn: b.manufacturedOn,
            expiresOn: b.expiresOn,
          };
          const [row] = await tx.insert(batches).values(values).$returningId();
          ctx.batchIds.set(b.lotNumber, row!.id);
          await createdEntry(tx, { id: actor.id, name: actor.name }, 'batch', row!.id, values);
        }
      });
    },
  }));
}

/** The settings rows that say how far the seed got (scripts/services/database.ts reads them). */
export async function writeSeedSetting(key: string, value: string, action: string): Promise<void> {
  // The key is the table's primary key: a second seed started at the same time fails here.
  await writeTransaction(async (tx) => {
    await tx.insert(settings).values({ key, value });
    await writeAudit(tx, { actor: { id: null, name: 'Demo seed' }, recordType: 'setting', recordId: 0, action, changes: [{ field: key, from: null, to: value }] });
  });
}
