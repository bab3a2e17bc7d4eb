import 'server-only';
import { and, eq, inArray, isNull, sql } from 'drizzle-orm';
import { db, type Tx } from '../../db/client';
import { batches, capsuleDefects, deviationBatches, deviations, users } from '../../db/schema';
import { diffFields, writeAudit } from '../audit';
import { assertCan, can } from '../auth/permissions';
import { ConflictError, InvalidTransitionError, NotFoundError, ValidationError } from '../errors';
import { type RecordActor, allowedEventsFor, ownerScope } from '../records/kind';
import { allocateNumber } from '../records/numbers';
import { type WriteOutcome, insertRecord, transitionRecord } from '../records/write-path';
import { type Classification, classify } from '../risk/classify';
import { isRichTextEmpty } from '../rich-text/sanitize';
import { parseInput } from '../validation/parse';
import { missingForApproval } from './investigation-schema';
import { type DeviationRow, deviationAuditFields, deviationKind } from './kind';
import {
  type CreateDraftInput,
  type DeviationVersionInput,
  type ReasonInput,
  type SignedInput,
  type SignedReasonInput,
  type TriageDecisionInput,
  type UpdateDraftInput,
  createDraftSchema,
  deviationVersionSchema,
  reasonSchema,
  signedReasonSchema,
  signedSchema,
  triageDecisionSchema,
  updateDraftSchema,
} from './schemas';

/*
 * Deviation commands. Lifecycle events go through the write path (transitionRecord), which checks
 * role, record, version and the machine's guards; what is particular to deviations is which columns
 * each event changes and the checks that need a query. Edits that are not transitions (the draft,
 * the triage fields) lock the row, check the same things and audit every changed field in one
 * transaction (21 CFR 11.10(e)).
 */

export type DeviationOutcome = WriteOutcome<typeof deviationKind>;

type DraftFields = ReturnType<typeof createDraftSchema.parse>;

/** The batch named and every held batch must exist; product and machine follow from the batch. */
async function resolveBatches(tx: Tx, input: DraftFields) {
  const ids = [...new Set([...(input.batchId ? [input.batchId] : []), ...input.heldBatchIds])];
  const found =
    ids.length === 0
      ? []
      : await tx
          .select({ id: batches.id, productId: batches.productId, machineId: batches.machineId, ringId: batches.ringId })
          .from(batches)
          .where(inArray(batches.id, ids));
  const known = new Set(found.map((b) => b.id));
  if (input.batchId && !known.has(input.batchId)) {
    throw new ValidationError('Pick a batch from the list.', { batchId: ['No batch has this id.'] });
  }
  const unknown = input.heldBatchIds.filter((b) => !known.has(b));
  if (unknown.length > 0) {
    throw new ValidationError('Pick the batches to hold from the list.', {
      heldBatchIds: [`No batch has the id ${unknown.join(', ')}.`],
    });
  }
  return found.find((b) => b.id === input.batchId) ?? null;
}

function draftColumns(input: DraftFields, batch: Awaited<ReturnType<typeof resolveBatches>>) {
  return {
    title: input.title,
    whatHappened: input.whatHappened,
    immediateActions: input.immediateActions ?? null,
    lineStopped: input.lineStopped,
    capsulesSegregated: input.capsulesSegregated,
    affectedCount: input.affectedCount ?? null,
    sampleDescription: input.sampleDescription ?? null,
    defectId: input.defectId ?? null,
    batchId: input.batchId ?? null,
    productId: batch?.productId ?? null,
    machineId: input.machineId ?? batch?.machineId ?? null,
    ringId: input.ringId ?? batch?.ringId ?? null,
    occurredAt: input.occurredAt,
  };
}

async function heldBatchIdsOf(tx: Tx, deviationId: number): Promise<number[]> {
  const rows = await tx
    .select({ batchId: deviationBatches.batchId })
    .from(deviationBatches)
    .where(and(eq(deviationBatches.deviationId, deviationId), eq(deviationBatches.onHold, true)))
    .orderBy(deviationBatches.batchId);
  return rows.map((r) => r.batchId);
}

/** A draft: no number yet (it is given on submission, so abandoned drafts leave no gaps). */
export async function createDraft(actor: RecordActor, raw: CreateDraftInput): Promise<DeviationOutcome> {
  const input = parseInput(createDraftSchema, raw);
  const { row, afterCommit } = await db.transaction(async (tx) => {
    const batch = await resolveBatches(tx, input);
    const created = await insertRecord(tx, deviationKind, {
      actor,
      permission: 'deviation.raise',
      values: { ...draftColumns(input, batch), raisedBy: actor.id, ownerId: actor.id },
    });
    if (input.heldBatchIds.length > 0) {
      await tx
        .insert(deviationBatches)
        .values(input.heldBatchIds.map((batchId) => ({ deviationId: created.row.id, batchId, onHold: true })));
    }
    return created;
  });
  await afterCommit();
  return { record: deviationKind.toDto(row), allowedEvents: allowedEventsFor(deviationKind, actor, row), signature: null };
}

/**
 * Locks the deviation and checks, in the order a person wants to hear them: it exists and they may
 * read it, they may do this to it, it is in the state the edit belongs to, nobody changed it since.
 */
async function lockForEdit(
  tx: Tx,
  actor: RecordActor,
  id: number,
  version: number,
  permission: 'deviation.edit_draft' | 'deviation.triage',
  state: DeviationRow['status'],
  what: string,
): Promise<DeviationRow> {
  const [row] = await tx.select().from(deviations).where(eq(deviations.id, id)).for('update');
  const scope = row ? ownerScope(deviationKind, row) : null;
  if (!row || !scope || !can(actor, 'deviation.read', scope)) throw new NotFoundError('This deviation');
  assertCan(actor, permission, scope);
  if (row.status !== state) {
    throw new InvalidTransitionError(`${what} is possible only while the deviation is ${state}; it is ${row.status} now.`);
  }
  if (row.version !== version) throw new ConflictError();
  return row;
}

async function saveEdit(
  tx: Tx,
  actor: RecordActor,
  before: DeviationRow,
  changes: Partial<typeof deviations.$inferInsert>,
  action: string,
  extraChanges: ReturnType<typeof diffFields> = [],
): Promise<DeviationRow> {
  const [result] = await tx
    .update(deviations)
    .set({ ...changes, version: sql`${deviations.version} + 1` })
    .where(and(eq(deviations.id, before.id), eq(deviations.version, before.version)));
  if (result.affectedRows !== 1) throw new ConflictError();
  const [after] = await tx.select().from(deviations).where(eq(deviations.id, before.id));
  await writeAudit(tx, {
    actor: { id: actor.id, name: actor.name },
    recordType: 'deviation',
    recordId: before.id,
    action,
    changes: [...diffFields(before, after!, deviationAuditFields), ...extraChanges],
  });
  return after!;
}

/** Only the author edits their draft (permission deviation.edit_draft, scope own). */
export async function updateDraft(actor: RecordActor, raw: UpdateDraftInput): Promise<DeviationOutcome> {
  const input = parseInput(updateDraftSchema, raw);
  const after = await db.transaction(async (tx) => {
    const before = await lockForEdit(tx, actor, input.id, input.version, 'deviation.edit_draft', 'draft', 'Editing the draft');
    const batch = await resolveBatches(tx, input);
    const heldBefore = await heldBatchIdsOf(tx, input.id);
    const heldAfter = [...input.heldBatchIds].sort((a, b) => a - b);
    await tx.delete(deviationBatches).where(eq(deviationBatches.deviationId, input.id));
    if (heldAfter.length > 0) {
      await tx.insert(deviationBatches).values(heldAfter.map((batchId) => ({ deviationId: input.id, batchId, onHold: true })));
    }
    return saveEdit(
      tx,
      actor,
      before,
      draftColumns(input, batch),
      'update_draft',
      diffFields({ heldBatchIds: heldBefore }, { heldBatchIds: heldAfter }, ['heldBatchIds']),
    );
  });
  return { record: deviationKind.toDto(after), allowedEvents: allowedEventsFor(deviationKind, actor, after), signature: null };
}

/** Reports the deviation: gives it its DEV number and puts the chosen batches on hold. */
export async function submitDeviation(actor: RecordActor, raw: DeviationVersionInput): Promise<DeviationOutcome> {
  const input = parseInput(deviationVersionSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'submit',
    actor,
    changes: async (_row, { tx, now }) => ({
      number: await allocateNumber(tx, 'deviation', now.getUTCFullYear()),
      reportedAt: now,
    }),
  });
}

export async function startTriage(actor: RecordActor, raw: DeviationVersionInput): Promise<DeviationOutcome> {
  const input = parseInput(deviationVersionSchema, raw);
  return transitionRecord(deviationKind, { id: input.id, expectedVersion: input.version, event: 'start_triage', actor });
}

/** The class a deviation naming no defect starts from, as the triage form shows it (common practice: assume major). */
export const classificationWithoutDefect = 'major' satisfies Classification;

/**
 * The triage decision: classification with its S, O, D and RPN, the investigator and the due date.
 * The class is checked here against the defect's catalogue class read from the database, never a
 * value the form sends: a class below the computed one (lib/risk/classify) needs a written
 * justification, and the computed class stands when none is picked.
 */
export async function recordTriage(actor: RecordActor, raw: TriageDecisionInput): Promise<DeviationOutcome> {
  const input = parseInput(triageDecisionSchema, raw);
  const after = await db.transaction(async (tx) => {
    const before = await lockForEdit(tx, actor, input.id, input.version, 'deviation.triage', 'triage', 'Recording the triage');
    const [defect] =
      before.defectId === null
        ? []
        : await tx
            .select({ defaultClassification: capsuleDefects.defaultClassification })
            .from(capsuleDefects)
            .where(eq(capsuleDefects.id, before.defectId));
    const assessed = classify({
      defaultClassification: defect?.defaultClassification ?? classificationWithoutDefect,
      severity: input.severity,
      occurrence: input.occurrence,
      detection: input.detection,
      chosen: input.classification ?? null,
    });
    if (assessed.overrideJustificationRequired && !input.classificationReason) {
      const message = `The computed class is ${assessed.computed}: give a written justification for recording ${assessed.classification}.`;
      throw new ValidationError(message, { classificationReason: [message] });
    }
    if (input.investigatorId) {
      const [investigator] = await tx
        .select({ id: users.id })
        .from(users)
        .where(and(eq(users.id, input.investigatorId), eq(users.role, 'qa_investigator'), eq(users.active, true)));
      if (!investigator) {
        const message = 'Pick an active QA investigator.';
        throw new ValidationError(message, { investigatorId: [message] });
      }
    }
    return saveEdit(
      tx,
      actor,
      before,
      {
        classification: assessed.classification,
        severity: input.severity,
        occurrence: input.occurrence,
        detection: input.detection,
        rpn: input.severity * input.occurrence * input.detection,
        classificationReason: input.classificationReason ?? null,
        investigatorId: input.investigatorId ?? before.investigatorId,
        ownerId: input.investigatorId ?? before.ownerId,
        dueAt: input.dueAt ?? before.dueAt,
      },
      'record_triage',
    );
  });
  return { record: deviationKind.toDto(after), allowedEvents: allowedEventsFor(deviationKind, actor, after), signature: null };
}

export async function assignInvestigation(actor: RecordActor, raw: DeviationVersionInput): Promise<DeviationOutcome> {
  const input = parseInput(deviationVersionSchema, raw);
  return transitionRecord(deviationKind, { id: input.id, expectedVersion: input.version, event: 'assign_investigation', actor });
}

/** The investigator signs as author of the investigation ("investigation complete"). */
export async function submitForApproval(actor: RecordActor, raw: SignedInput): Promise<DeviationOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'submit_for_approval',
    actor,
    password: input.password,
    changes: (row) => {
      // 21 CFR 211.192: the written record of the investigation includes its conclusions and follow-up;
      // the signature "investigation complete" is refused while any of them is missing.
      const missing = missingForApproval(row, isRichTextEmpty);
      if (Object.keys(missing).length > 0) {
        throw new ValidationError(
          `Complete the investigation before signing it: ${Object.values(missing).flat().join(' ')}`,
          missing,
        );
      }
      return {};
    },
  });
}

export async function returnForRework(actor: RecordActor, raw: ReasonInput): Promise<DeviationOutcome> {
  const input = parseInput(reasonSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'return_for_rework',
    actor,
    reason: input.reason,
  });
}

/**
 * No deviation closes while a batch it holds has no disposition (21 CFR 211.192: the investigation
 * extends to every batch that may be affected). The machine's guard cannot count them (context is
 * computed from the row alone), so the check runs here, on the locked row, in the same transaction.
 */
async function assertEveryHeldBatchDisposed(tx: Tx, deviationId: number): Promise<void> {
  const open = await tx
    .select({ lot: batches.lotNumber })
    .from(deviationBatches)
    .innerJoin(batches, eq(batches.id, deviationBatches.batchId))
    .where(
      and(
        eq(deviationBatches.deviationId, deviationId),
        eq(deviationBatches.onHold, true),
        isNull(deviationBatches.disposition),
      ),
    );
  if (open.length > 0) {
    const lots = open.map((b) => b.lot).join(', ');
    throw new ValidationError(
      `Every held batch needs a disposition before the deviation closes; ${lots} ${open.length === 1 ? 'has' : 'have'} none. ` +
        'Record it with the disposition form under "Held batches".',
      { dispositions: [`Record a disposition for ${lots} under "Held batches".`] },
    );
  }
}

/** The approver signs ("approved"); each held batch takes its disposition. */
export async function approveDeviation(actor: RecordActor, raw: SignedInput): Promise<DeviationOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'approve',
    actor,
    password: input.password,
    changes: async (row, { tx, now }) => {
      await assertEveryHeldBatchDisposed(tx, row.id);
      return { closedAt: now };
    },
  });
}

/** A minor deviation closed at triage, with a written justification and the approver's signature. */
export async function closeMinor(actor: RecordActor, raw: SignedReasonInput): Promise<DeviationOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'close_minor',
    actor,
    reason: input.reason,
    password: input.password,
    changes: async (row, { tx, now }) => {
      await assertEveryHeldBatchDisposed(tx, row.id);
      return { closedAt: now, closureJustification: input.reason };
    },
  });
}

/**
 * Raised in error or twice. The holds this deviation placed are not lifted here: a batch leaves hold
 * only by a recorded disposition, never as a side effect of a cancellation.
 */
export async function cancelDeviation(actor: RecordActor, raw: SignedReasonInput): Promise<DeviationOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'cancel',
    actor,
    reason: input.reason,
    password: input.password,
    changes: (_row, { now }) => ({ cancelReason: input.reason, closedAt: now }),
  });
}
