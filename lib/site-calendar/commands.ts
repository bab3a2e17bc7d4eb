import 'server-only';
import { eq } from 'drizzle-orm';
import { db } from '../../db/client';
import { siteClosures } from '../../db/schema';
import { assertCan } from '../auth/permissions';
import type { IsoDate } from '../clocks/dates';
import { classifications, dueDaySettingKeys, readDueDaySettings } from '../clocks/due-dates';
import { ConflictError, NotFoundError, ValidationError } from '../errors';
import type { RecordActor } from '../records/kind';
import { writeSettings } from '../records/settings';
import { createRecord, editRecord } from '../records/write-path';
import { addClosureSchema, deactivateClosureSchema, dueDaysSchema } from '../validation/clocks';
import { parseInput } from '../validation/parse';
import { siteClosureKind } from './closure-kind';

/*
 * Site calendar administration, on the write path. Closures are never deleted, only deactivated,
 * so a clock computed while a closure was active can still be explained from the audit trail; the
 * closure targets are settings, written by lib/records/settings.ts. Every change is made in one
 * transaction with its audit entry (21 CFR 11.10(e)).
 */

export type CalendarActor = RecordActor;

const isDuplicateKey = (err: unknown): boolean => {
  const e = err as { errno?: number; cause?: { errno?: number } };
  return (e?.cause?.errno ?? e?.errno) === 1062;
};

function alreadyClosed(day: IsoDate, description: string): ValidationError {
  const taken = `${day} is already a site closure (${description}).`;
  return new ValidationError(taken, { day: [taken] });
}

/** The day's closure as it stands; the write path reads it again under its lock. */
async function closureOn(day: IsoDate) {
  const [row] = await db
    .select({ id: siteClosures.id, active: siteClosures.active, description: siteClosures.description })
    .from(siteClosures)
    .where(eq(siteClosures.day, day));
  return row;
}

/** Adds a closure, or reactivates the day's closure if it was deactivated (with the new description). */
export async function addSiteClosure(actor: CalendarActor, input: unknown): Promise<{ day: IsoDate }> {
  assertCan(actor, 'calendar.manage');
  const data = parseInput(addClosureSchema, input);
  const existing = await closureOn(data.day);
  if (existing?.active) throw alreadyClosed(data.day, existing.description);
  if (existing) {
    await editRecord(siteClosureKind, {
      id: existing.id,
      section: 'reactivation',
      actor,
      expectedVersion: null,
      action: 'closure_reactivated',
      apply(row) {
        if (row.active) throw alreadyClosed(data.day, row.description);
        return { changes: { active: true, description: data.description } };
      },
    });
    return { day: data.day };
  }
  try {
    await createRecord(siteClosureKind, actor, 'calendar.manage', {
      action: 'closure_added',
      values: { day: data.day, description: data.description, active: true, createdBy: actor.id },
    });
  } catch (err) {
    // Two administrators adding the same day at once: the unique day refuses the second.
    if (!isDuplicateKey(err)) throw err;
    throw alreadyClosed(data.day, (await closureOn(data.day))?.description ?? data.description);
  }
  return { day: data.day };
}

export async function deactivateSiteClosure(actor: CalendarActor, input: unknown): Promise<{ day: IsoDate }> {
  assertCan(actor, 'calendar.manage');
  const data = parseInput(deactivateClosureSchema, input);
  const existing = await closureOn(data.day);
  if (!existing) throw new NotFoundError('The site closure');
  await editRecord(siteClosureKind, {
    id: existing.id,
    section: 'deactivation',
    actor,
    expectedVersion: null,
    action: 'closure_deactivated',
    reason: data.reason,
    apply(row) {
      if (!row.active) throw new ConflictError(`The closure on ${data.day} is already inactive.`);
      return { changes: { active: false } };
    },
  });
  return { day: data.day };
}

/** Sets the three closure targets; one audit entry names each key that changed, old → new. */
export async function updateDueDays(actor: CalendarActor, input: unknown): Promise<Record<(typeof classifications)[number], number>> {
  assertCan(actor, 'settings.manage');
  const data = parseInput(dueDaysSchema, input);
  const { before, changes } = await writeSettings({
    actor,
    permission: 'settings.manage',
    action: 'due_days_changed',
    reason: data.reason,
    values: Object.fromEntries(classifications.map((c) => [dueDaySettingKeys[c], String(data[c])])),
  });
  if (changes.length === 0) {
    const current = readDueDaySettings(Object.fromEntries(Object.entries(before).map(([key, value]) => [key, value ?? undefined])));
    throw new ValidationError(
      `Nothing changed: the targets are already ${current.critical.days}, ${current.major.days} and ${current.minor.days} days.`,
    );
  }
  return { critical: data.critical, major: data.major, minor: data.minor };
}
