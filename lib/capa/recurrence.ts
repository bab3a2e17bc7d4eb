import 'server-only';
import { type SQL, and, count, eq, gt, gte, lt, lte, notInArray, or } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { batches, capsuleDefects, deviations, fillingRings, machines } from '../../db/schema';
import {
  type RecurrenceCounts,
  type RecurrenceTarget,
  type RecurrenceVerdict,
  describeRecurrence,
  recurrenceVerdict,
  wholeDaysBetween,
} from './recurrence-rule';
import type { RecurrenceCriterion } from './schemas';

/*
 * The evidence for a recurrence criterion, read from Plumbline's own records: deviations with the
 * same defect on the same machine or ring raised since the CAPA's actions were completed, and the
 * batches made there since. Both counts are range scans on indexes the lists already use
 * (deviations_defect_idx / _machine_idx / _ring_idx on (x, created_at); batches_machine_idx /
 * _ring_idx on (x, manufactured_on)). Drafts are not yet reported and cancelled deviations were
 * raised in error, so neither counts.
 */

export interface RecurrenceEvidence extends RecurrenceCounts {
  target: RecurrenceTarget;
  met: RecurrenceVerdict;
  defect: { id: number; name: string } | null;
  machine: { id: number; label: string } | null;
  ring: { id: number; label: string } | null;
  /** e.g. "0 broken body deviations on BW-FIL-02 over 14 of 20 batches since 2026-10-30". */
  summary: string;
}

/**
 * `until` ends the count: a closed CAPA shows the evidence as it stood when it was decided, not what
 * happened afterwards (that belongs to a new deviation and, if needed, a new CAPA).
 */
export async function computeRecurrence(
  dbOrTx: DbOrTx,
  criterion: RecurrenceCriterion,
  since: Date | null,
  now: Date = new Date(),
  until: Date | null = null,
): Promise<RecurrenceEvidence> {
  const end = until !== null && until < now ? until : now;
  const [defect, machine, ring] = await Promise.all([
    criterion.defectId === undefined
      ? null
      : dbOrTx
          .select({ id: capsuleDefects.id, name: capsuleDefects.name })
          .from(capsuleDefects)
          .where(eq(capsuleDefects.id, criterion.defectId))
          .then((r) => r[0] ?? null),
    criterion.machineId === undefined
      ? null
      : dbOrTx
          .select({ id: machines.id, assetTag: machines.assetTag, name: machines.name })
          .from(machines)
          .where(eq(machines.id, criterion.machineId))
          .then((r) => (r[0] ? { id: r[0].id, label: `${r[0].name} (${r[0].assetTag})` } : null)),
    criterion.ringId === undefined
      ? null
      : dbOrTx
          .select({ id: fillingRings.id, serial: fillingRings.serial })
          .from(fillingRings)
          .where(eq(fillingRings.id, criterion.ringId))
          .then((r) => (r[0] ? { id: r[0].id, label: `ring ${r[0].serial}` } : null)),
  ]);

  const target: RecurrenceTarget = { batches: criterion.batches ?? null, days: criterion.days ?? null };
  let counts: RecurrenceCounts = { since: null, recurrences: 0, batchesSince: 0, daysSince: 0 };
  if (since !== null) {
    const place = (machineColumn: typeof deviations.machineId | typeof batches.machineId, ringColumn: typeof deviations.ringId | typeof batches.ringId) =>
      or(
        criterion.machineId !== undefined ? eq(machineColumn, criterion.machineId) : undefined,
        criterion.ringId !== undefined ? eq(ringColumn, criterion.ringId) : undefined,
      );
    const deviationWhere: (SQL | undefined)[] = [
      criterion.defectId !== undefined ? eq(deviations.defectId, criterion.defectId) : undefined,
      place(deviations.machineId, deviations.ringId),
      // created_at leads the range on the index; occurred_at keeps out events from before the actions.
      gte(deviations.createdAt, since),
      gte(deviations.occurredAt, since),
      lt(deviations.createdAt, end),
      notInArray(deviations.status, ['draft', 'cancelled']),
    ];
    // A batch counts from the day after the actions were completed: one made that day may have run before.
    const sinceDay = since.toISOString().slice(0, 10);
    const [[deviationCount], [batchCount]] = await Promise.all([
      dbOrTx.select({ n: count() }).from(deviations).where(and(...deviationWhere)),
      criterion.machineId === undefined && criterion.ringId === undefined
        ? Promise.resolve([{ n: 0 }])
        : dbOrTx
            .select({ n: count() })
            .from(batches)
            .where(and(place(batches.machineId, batches.ringId), gt(batches.manufacturedOn, sinceDay), lte(batches.manufacturedOn, end.toISOString().slice(0, 10)))),
    ]);
    counts = {
      since: since.toISOString(),
      recurrences: deviationCount?.n ?? 0,
      batchesSince: batchCount?.n ?? 0,
      daysSince: wholeDaysBetween(since.toISOString(), end),
    };
  }

  const what = defect ? defect.name.toLowerCase() : 'any';
  const where = [machine?.label, ring?.label].filter(Boolean).join(' or ') || 'any machine';
  return {
    ...counts,
    target,
    met: recurrenceVerdict(counts, target),
    defect,
    machine,
    ring,
    summary: describeRecurrence(counts, target, what, where),
  };
}
