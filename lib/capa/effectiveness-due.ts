import 'server-only';
import { and, eq, isNotNull } from 'drizzle-orm';
import { db as defaultDb, type Db } from '../../db/client';
import { capas, users } from '../../db/schema';
import { ConflictError, InvalidTransitionError } from '../errors';
import { openEffectivenessCheck } from './commands';
import { computeRecurrence } from './recurrence';
import { parseRecurrenceCriterion } from './schemas';

/*
 * Opens the effectiveness check of a CAPA whose actions are all completed once its criterion has run
 * its course: the batches or days the plan asked for have passed, or a recurrence already shows the
 * actions did not work (no reason to wait for the rest of the period). A plan without a recurrence
 * criterion opens when its effectiveness due date passes; one with neither is opened on demand.
 *
 * The worker acts in the owner's name, as the owner would on the page, with the reason recorded in
 * the history. Run as often as you like: a CAPA already opened (or changed meanwhile) is skipped.
 * Only CAPAs in implementation with no open action are read, on the status index.
 */

export interface OpenedCheck {
  id: number;
  number: string;
  reason: string;
}

export interface EffectivenessSweep {
  opened: OpenedCheck[];
  /** CAPAs that could not be opened (e.g. the owner's role changed): named so the log says which. */
  failed: { number: string; message: string }[];
}

export async function openDueEffectivenessChecks(opts: { now?: Date; database?: Db } = {}): Promise<EffectivenessSweep> {
  const database = opts.database ?? defaultDb;
  const now = opts.now ?? new Date();
  const candidates = await database
    .select({
      id: capas.id,
      number: capas.number,
      version: capas.version,
      criterion: capas.recurrenceCriterion,
      completedAt: capas.actionsCompletedAt,
      dueAt: capas.effectivenessDueAt,
      ownerId: users.id,
      ownerName: users.name,
      ownerRole: users.role,
    })
    .from(capas)
    .innerJoin(users, eq(users.id, capas.ownerId))
    .where(and(eq(capas.status, 'implementation'), eq(capas.actionsOpen, 0), isNotNull(capas.actionsCompletedAt)));

  const opened: OpenedCheck[] = [];
  const failed: EffectivenessSweep['failed'] = [];
  for (const c of candidates) {
    const criterion = parseRecurrenceCriterion(c.criterion);
    let reason: string | null = null;
    if (criterion) {
      const evidence = await computeRecurrence(database, criterion, c.completedAt, now);
      if (evidence.met === false) reason = `Opened by the system: a recurrence shows on the record (${evidence.summary}).`;
      else if (evidence.met === true) reason = `Opened by the system: the criterion's period has run (${evidence.summary}).`;
    } else if (c.dueAt && c.dueAt.getTime() <= now.getTime()) {
      reason = `Opened by the system: the effectiveness due date ${c.dueAt.toISOString().slice(0, 10)} has passed.`;
    }
    if (!reason) continue;
    try {
      await openEffectivenessCheck({ id: c.ownerId, name: c.ownerName, role: c.ownerRole }, { id: c.id, version: c.version, reason });
      opened.push({ id: c.id, number: c.number, reason });
    } catch (err) {
      // Someone opened, cancelled or changed it since it was read: their change stands.
      if (err instanceof ConflictError || err instanceof InvalidTransitionError) continue;
      failed.push({ number: c.number, message: err instanceof Error ? err.message : String(err) });
    }
  }
  return { opened, failed };
}
