import 'server-only';
import { eq, inArray } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { settings, siteClosures } from '../../db/schema';
import { type FieldChange, writeAudit } from '../audit';
import { assertCan, type Actor } from '../auth/permissions';
import { closureRecordIdOf as closureRecordId } from '../clocks/closure-id';
import type { IsoDate } from '../clocks/dates';
import { classifications, dueDaySettingKeys, readDueDaySettings } from '../clocks/due-dates';
import { ConflictError, NotFoundError, ValidationError } from '../errors';
import { addClosureSchema, deactivateClosureSchema, dueDaysSchema } from '../validation/clocks';
import { parseInput } from '../validation/parse';

/*
 * Site calendar administration. Closures are never deleted, only deactivated, so a clock computed
 * while a closure was active can still be explained from the audit trail. Every change is made in
 * one transaction with its audit entry (21 CFR 11.10(e)).
 */

export interface CalendarActor extends Actor {
  name: string;
}


export async function addSiteClosure(actor: CalendarActor, input: unknown, database: DbOrTx = db): Promise<{ day: IsoDate }> {
  assertCan(actor, 'calendar.manage');
  const data = parseInput(addClosureSchema, input);
  await database.transaction(async (tx) => {
    const [existing] = await tx.select().from(siteClosures).where(eq(siteClosures.day, data.day)).for('update');
    if (existing?.active) {
      const taken = `${data.day} is already a site closure (${existing.description}).`;
      throw new ValidationError(taken, { day: [taken] });
    }
    if (existing) {
      await tx.update(siteClosures).set({ active: true, description: data.description }).where(eq(siteClosures.day, data.day));
    } else {
      await tx.insert(siteClosures).values({ day: data.day, description: data.description, active: true, createdBy: actor.id });
    }
    const changes: FieldChange[] = existing
      ? [
          { field: 'active', from: false, to: true },
          ...(existing.description === data.description ? [] : [{ field: 'description', from: existing.description, to: data.description }]),
        ]
      : [
          { field: 'day', from: null, to: data.day },
          { field: 'description', from: null, to: data.description },
          { field: 'active', from: null, to: true },
        ];
    await writeAudit(tx, {
      actor: { id: actor.id, name: actor.name },
      recordType: 'site_closure',
      recordId: closureRecordId(data.day),
      action: existing ? 'closure_reactivated' : 'closure_added',
      changes,
    });
  });
  return { day: data.day };
}

export async function deactivateSiteClosure(actor: CalendarActor, input: unknown, database: DbOrTx = db): Promise<{ day: IsoDate }> {
  assertCan(actor, 'calendar.manage');
  const data = parseInput(deactivateClosureSchema, input);
  await database.transaction(async (tx) => {
    const [existing] = await tx.select().from(siteClosures).where(eq(siteClosures.day, data.day)).for('update');
    if (!existing) throw new NotFoundError('The site closure');
    if (!existing.active) throw new ConflictError(`The closure on ${data.day} is already inactive.`);
    await tx.update(siteClosures).set({ active: false }).where(eq(siteClosures.day, data.day));
    await writeAudit(tx, {
      actor: { id: actor.id, name: actor.name },
      recordType: 'site_closure',
      recordId: closureRecordId(data.day),
      action: 'closure_deactivated',
      changes: [{ field: 'active', from: true, to: false }],
      reason: data.reason,
    });
  });
  return { day: data.day };
}

/** Sets the three closure targets; one audit entry names each key that changed, old → new. */
export async function updateDueDays(
  actor: CalendarActor,
  input: unknown,
  database: DbOrTx = db,
): Promise<Record<(typeof classifications)[number], number>> {
  assertCan(actor, 'settings.manage');
  const data = parseInput(dueDaysSchema, input);
  const keys = Object.values(dueDaySettingKeys);
  await database.transaction(async (tx) => {
    const rows = await tx.select().from(settings).where(inArray(settings.key, keys)).for('update');
    const stored = Object.fromEntries(rows.map((r) => [r.key, r.value]));
    const current = readDueDaySettings(stored);
    const changes: FieldChange[] = [];
    for (const c of classifications) {
      const key = dueDaySettingKeys[c];
      const next = String(data[c]);
      if (stored[key] === next) continue;
      changes.push({ field: key, from: stored[key] ?? null, to: next });
      if (stored[key] === undefined) await tx.insert(settings).values({ key, value: next });
      else await tx.update(settings).set({ value: next }).where(eq(settings.key, key));
    }
    if (changes.length === 0) {
      throw new ValidationError(
        `Nothing changed: the targets are already ${current.critical.days}, ${current.major.days} and ${current.minor.days} days.`,
      );
    }
    await writeAudit(tx, {
      actor: { id: actor.id, name: actor.name },
      recordType: 'setting',
      // Settings are keyed by name, not number (as in the demo seed); the keys are named in the changes.
      recordId: 0,
      action: 'due_days_changed',
      changes,
      reason: data.reason,
    });
  });
  return { critical: data.critical, major: data.major, minor: data.minor };
}
