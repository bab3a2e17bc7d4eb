import 'server-only';
import { and, desc, eq, gte, inArray, lt, notExists, sql } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { batches, deviationBatches, fillingRings, machines, products, weightChecks } from '../../db/schema';
import { diffFields } from '../audit';
import { assertCan } from '../auth/permissions';
import { ConflictError, ValidationError, fieldError } from '../errors';
import type { RecordActor } from '../records/kind';
import { editRecord, getVisibleRow } from '../records/write-path';
import { parseInput } from '../validation/parse';
import {
  defaultAql,
  defaultInspectionLevel,
  defaultSeverity,
  noteRequirement,
  reInspectionPlan,
} from './disposition-plan';
import type { HeldBatchDto } from './detail';
import { type DeviationRow, deviationKind, setBatchStatus } from './kind';
import type { Disposition } from './labels';
import { type ExtendHoldsInput, type RecordDispositionInput, extendHoldsSchema, recordDispositionSchema } from './schemas';

/*
 * The batches a deviation holds (21 CFR 211.192: the investigation extends to every batch that may
 * be affected). At triage QA may extend the holds to batches made on the same filler or ring since
 * its last good weight check; later each held batch gets a disposition. The assigned investigator
 * recommends it during the investigation; an independent QA approver decides it at approval (or at
 * triage, for a minor deviation closed there), since releasing or rejecting a batch is the quality
 * unit's decision (21 CFR 211.22(a)). Every change bumps the deviation's version and is audited on
 * the deviation in the same transaction (21 CFR 11.10(e)).
 */

export type DispositionMode = 'recommend' | 'decide';

/** Which of the kind's sections a disposition is recorded in, by the deviation's state. */
const dispositionSection = (status: DeviationRow['status']) => (status === 'investigation' ? 'recommendation' : 'disposition');

const dispositionFields = ['recommendedDisposition', 'disposition', 'dispositionNote', 'samplingPlan'] as const;

export interface DispositionOutcome {
  deviationId: number;
  /** The deviation's version after the change, for the next edit. */
  version: number;
  batch: HeldBatchDto;
}

/**
 * Records a held batch's disposition: the investigator's recommendation (which is also the proposal
 * the approver signs) or the approver's final decision. Reject and rework need a note; so does a
 * final decision that differs from the recommendation. A re-inspection carries its ISO 2859-1 plan.
 */
export async function recordDisposition(actor: RecordActor, raw: RecordDispositionInput): Promise<DispositionOutcome> {
  const input = parseInput(recordDispositionSchema, raw);
  const seen = await getVisibleRow(db, deviationKind, input.id, actor);
  const outcome = await editRecord(deviationKind, {
    id: input.id,
    section: dispositionSection(seen.status),
    actor,
    expectedVersion: input.version,
    action: 'record_disposition',
    async apply(row, { tx }) {
      // The section was chosen from a read before the lock; the state it was chosen for still holds.
      if (dispositionSection(row.status) !== dispositionSection(seen.status)) throw new ConflictError();
      const mode: DispositionMode = row.status === 'investigation' ? 'recommend' : 'decide';
      const [held] = await tx
        .select({ batch: deviationBatches, lot: batches.lotNumber, lotSize: batches.sizeCapsules, batchStatus: batches.status })
        .from(deviationBatches)
        .innerJoin(batches, eq(batches.id, deviationBatches.batchId))
        .where(and(eq(deviationBatches.deviationId, row.id), eq(deviationBatches.batchId, input.batchId), eq(deviationBatches.onHold, true)));
      if (!held) {
        throw fieldError('batchId', 'This batch is not held by this deviation.');
      }

      const needNote = noteRequirement(
        input.disposition,
        mode === 'decide' && row.status === 'approval' ? { recommended: held.batch.recommendedDisposition } : null,
      );
      if (needNote && !input.note) throw new ValidationError(needNote, { note: [needNote] });

      let samplingPlan: string | null = null;
      if (input.disposition === 're_inspect') {
        const plan = reInspectionPlan({
          lotSize: held.lotSize,
          level: input.inspectionLevel ?? defaultInspectionLevel,
          aql: input.aql ?? defaultAql,
          severity: input.inspectionSeverity ?? defaultSeverity,
        });
        if (!plan.ok) throw new ValidationError(plan.message, { aql: [plan.message] });
        samplingPlan = plan.summary;
      }

      const before = held.batch;
      const after = {
        ...before,
        // At triage (minor, no investigation) and during the investigation the decision is also the recommendation.
        recommendedDisposition: row.status === 'approval' ? before.recommendedDisposition : input.disposition,
        disposition: input.disposition as Disposition,
        // An approver who confirms the recommendation without a word keeps the investigator's note.
        dispositionNote:
          input.note ?? (row.status === 'approval' && input.disposition === before.disposition ? before.dispositionNote : null),
        samplingPlan,
      };
      const changes = diffFields(before, after, dispositionFields).map((c) => ({ ...c, field: `${c.field} (${held.lot})` }));
      if (changes.length === 0) {
        throw new ValidationError(`${held.lot} already has this disposition; nothing to save.`, { disposition: ['Nothing changed.'] });
      }
      await tx
        .update(deviationBatches)
        .set({
          recommendedDisposition: after.recommendedDisposition,
          disposition: after.disposition,
          dispositionNote: after.dispositionNote,
          samplingPlan: after.samplingPlan,
        })
        .where(and(eq(deviationBatches.deviationId, row.id), eq(deviationBatches.batchId, input.batchId)));
      const batch: HeldBatchDto = {
        batchId: input.batchId,
        lotNumber: held.lot,
        batchStatus: held.batchStatus,
        onHold: true,
        recommendedDisposition: after.recommendedDisposition,
        disposition: after.disposition,
        dispositionNote: after.dispositionNote,
        samplingPlan: after.samplingPlan,
      };
      return { audit: changes, result: batch };
    },
  });
  return { deviationId: outcome.record.id, version: outcome.record.version, batch: outcome.result! };
}

export interface HoldSuggestionDto {
  batchId: number;
  lotNumber: string;
  productCode: string;
  productName: string;
  /** YYYY-MM-DD. */
  manufacturedOn: string;
  machineName: string | null;
  ringSerial: string | null;
  /** What it shares with the deviation. */
  sharedWith: 'machine' | 'ring' | 'machine and ring';
  status: (typeof batches.$inferSelect)['status'];
  /** A rejected batch is out of the supply chain already; there is nothing to hold. */
  canHold: boolean;
}

export interface HoldSuggestionsDto {
  /** YYYY-MM-DD: batches made on or after this day are suggested. */
  since: string;
  /** Where `since` comes from. */
  basis: { kind: 'weight_check'; checkedAt: string } | { kind: 'default_window'; days: number };
  suggestions: HoldSuggestionDto[];
}

/** Common practice when no passing check is on record: look back 30 days from the occurrence. */
const defaultLookBackDays = 30;
const suggestionLimit = 20;

/**
 * Batches that may share the deviation's cause: made on the same filler or with the same ring since
 * the last passing weight check there before it happened (common practice: product made since the
 * last good check is suspect), newest first, leaving out the batches this deviation already holds.
 * Each side is read from its own index (batches by machine or by ring, then manufacture date).
 */
export async function listHoldSuggestions(deviationId: number, viewer: RecordActor, dbOrTx: DbOrTx = db): Promise<HoldSuggestionsDto> {
  const row = await getVisibleRow(dbOrTx, deviationKind, deviationId, viewer);
  assertCan(viewer, 'deviation.triage');

  const onEquipment = row.machineId !== null ? eq(weightChecks.machineId, row.machineId) : row.ringId !== null ? eq(weightChecks.ringId, row.ringId) : null;
  const [lastGood] = onEquipment
    ? await dbOrTx
        .select({ checkedAt: weightChecks.checkedAt })
        .from(weightChecks)
        .where(and(onEquipment, eq(weightChecks.verdict, 'pass'), lt(weightChecks.checkedAt, row.occurredAt)))
        .orderBy(desc(weightChecks.checkedAt))
        .limit(1)
    : [];
  const sinceDate = lastGood ? lastGood.checkedAt : new Date(row.occurredAt.getTime() - defaultLookBackDays * 86_400_000);
  const since = sinceDate.toISOString().slice(0, 10);
  const basis: HoldSuggestionsDto['basis'] = lastGood
    ? { kind: 'weight_check', checkedAt: lastGood.checkedAt.toISOString() }
    : { kind: 'default_window', days: defaultLookBackDays };

  const notHeldHere = notExists(
    dbOrTx
      .select({ one: sql`1` })
      .from(deviationBatches)
      .where(and(eq(deviationBatches.deviationId, row.id), eq(deviationBatches.batchId, batches.id))),
  );
  const idsOn = async (column: typeof batches.machineId | typeof batches.ringId, value: number | null) =>
    value === null
      ? []
      : dbOrTx
          .select({ id: batches.id, manufacturedOn: batches.manufacturedOn })
          .from(batches)
          .where(and(eq(column, value), gte(batches.manufacturedOn, since), notHeldHere))
          .orderBy(desc(batches.manufacturedOn), desc(batches.id))
          .limit(suggestionLimit);
  const [byMachine, byRing] = await Promise.all([idsOn(batches.machineId, row.machineId), idsOn(batches.ringId, row.ringId)]);
  const picked = [...new Map([...byMachine, ...byRing].map((b) => [b.id, b])).values()]
    .sort((a, b) => b.manufacturedOn.localeCompare(a.manufacturedOn) || b.id - a.id)
    .slice(0, suggestionLimit);
  if (picked.length === 0) return { since, basis, suggestions: [] };

  const details = await dbOrTx
    .select({
      batchId: batches.id,
      lotNumber: batches.lotNumber,
      productCode: products.code,
      productName: products.name,
      manufacturedOn: batches.manufacturedOn,
      machineId: batches.machineId,
      ringId: batches.ringId,
      machineName: machines.name,
      ringSerial: fillingRings.serial,
      status: batches.status,
    })
    .from(batches)
    .innerJoin(products, eq(products.id, batches.productId))
    .leftJoin(machines, eq(machines.id, batches.machineId))
    .leftJoin(fillingRings, eq(fillingRings.id, batches.ringId))
    .where(inArray(batches.id, picked.map((p) => p.id)));
  const byId = new Map(details.map((d) => [d.batchId, d]));
  const suggestions = picked.flatMap((p): HoldSuggestionDto[] => {
    const d = byId.get(p.id);
    if (!d) return [];
    const sameMachine = row.machineId !== null && d.machineId === row.machineId;
    const sameRing = row.ringId !== null && d.ringId === row.ringId;
    return [
      {
        batchId: d.batchId,
        lotNumber: d.lotNumber,
        productCode: d.productCode,
        productName: d.productName,
        manufacturedOn: d.manufacturedOn,
        machineName: d.machineName,
        ringSerial: d.ringSerial,
        sharedWith: sameMachine && sameRing ? 'machine and ring' : sameRing ? 'ring' : 'machine',
        status: d.status,
        canHold: d.status !== 'rejected',
      },
    ];
  });
  return { since, basis, suggestions };
}

export interface ExtendHoldsOutcome {
  deviationId: number;
  version: number;
  /** Lots put on hold by this call. */
  held: string[];
}

/**
 * Extends the deviation's holds at triage (21 CFR 211.192): each batch is added to the deviation
 * and put on hold, each status change audited on the batch, the list of held batches on the deviation.
 */
export async function extendHolds(actor: RecordActor, raw: ExtendHoldsInput): Promise<ExtendHoldsOutcome> {
  const input = parseInput(extendHoldsSchema, raw);
  const outcome = await editRecord(deviationKind, {
    id: input.id,
    section: 'holds',
    actor,
    expectedVersion: input.version,
    action: 'extend_holds',
    async apply(row, { tx, related }) {
      const found = await tx
        .select({ id: batches.id, lot: batches.lotNumber, status: batches.status })
        .from(batches)
        .where(inArray(batches.id, input.batchIds));
      const missing = input.batchIds.filter((b) => !found.some((f) => f.id === b));
      if (missing.length > 0) {
        throw new ValidationError('Pick the batches to hold from the list.', { batchIds: [`No batch has the id ${missing.join(', ')}.`] });
      }
      const rejected = found.filter((b) => b.status === 'rejected');
      if (rejected.length > 0) {
        throw fieldError('batchIds', `${rejected.map((b) => b.lot).join(', ')} ${rejected.length === 1 ? 'is' : 'are'} rejected already; there is nothing to hold.`);
      }
      const heldBefore = related.held.filter((h) => h.onHold).map((h) => h.batchId);
      const already = found.filter((b) => heldBefore.includes(b.id));
      if (already.length > 0) {
        throw fieldError('batchIds', `This deviation holds ${already.map((b) => b.lot).join(', ')} already.`);
      }

      const label = row.number ?? `draft #${row.id}`;
      // In id order, so two writers holding the same batches queue instead of deadlocking.
      const sorted = [...found].sort((a, b) => a.id - b.id);
      for (const b of sorted) {
        if (related.held.some((e) => e.batchId === b.id)) {
          await tx
            .update(deviationBatches)
            .set({ onHold: true })
            .where(and(eq(deviationBatches.deviationId, row.id), eq(deviationBatches.batchId, b.id)));
        } else {
          await tx.insert(deviationBatches).values({ deviationId: row.id, batchId: b.id, onHold: true });
        }
        await setBatchStatus(tx, actor, b.id, 'on_hold', 'hold', `Put on hold by deviation ${label}`);
      }
      const heldAfter = [...heldBefore, ...sorted.map((b) => b.id)].sort((a, b) => a - b);
      return {
        audit: diffFields({ heldBatchIds: [...heldBefore].sort((a, b) => a - b) }, { heldBatchIds: heldAfter }, ['heldBatchIds']),
        result: [...sorted].sort((a, b) => a.lot.localeCompare(b.lot)).map((b) => b.lot),
      };
    },
  });
  return { deviationId: outcome.record.id, version: outcome.record.version, held: outcome.result! };
}

/** Lot size (capsules) of each batch the deviation holds, for the re-inspection plan on the page. */
export async function listHeldBatchSizes(deviationId: number, dbOrTx: DbOrTx = db): Promise<Record<number, number>> {
  const rows = await dbOrTx
    .select({ batchId: batches.id, size: batches.sizeCapsules })
    .from(deviationBatches)
    .innerJoin(batches, eq(batches.id, deviationBatches.batchId))
    .where(eq(deviationBatches.deviationId, deviationId));
  return Object.fromEntries(rows.map((r) => [r.batchId, r.size]));
}
