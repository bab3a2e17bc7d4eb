import 'server-only';
import {  eq, inArray } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { batches, capsuleDefects, deviationBatches } from '../../db/schema';
import { diffFields } from '../audit';
import { ValidationError, fieldError } from '../errors';
import { assertCandidate } from '../users/candidates';
import type { RecordActor } from '../records/kind';
import { allocateNumber } from '../records/numbers';
import { type SignOptions, type WriteOutcome, createRecord, editRecord, transitionRecord } from '../records/write-path';
import { type Classification, classify } from '../risk/classify';
import { isRichTextEmpty } from '../rich-text/sanitize';
import { parseInput } from '../validation/parse';
import { missingForApproval } from './investigation-schema';
import { deviationKind } from './kind';
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
 * Deviation commands: what each event and each section edit changes. Who may do it, in which
 * state, and what the record must be like first are the record kind's rules (lib/deviations/kind.ts),
 * which the write path checks on the locked row; a command adds only the checks that depend on its
 * input (a batch that must exist, a class that must be justified).
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

const sortedIds = (ids: readonly number[]) => [...ids].sort((a, b) => a - b);

/** A draft: no number yet (it is given on submission, so abandoned drafts leave no gaps). */
export async function createDraft(actor: RecordActor, raw: CreateDraftInput): Promise<DeviationOutcome> {
  const input = parseInput(createDraftSchema, raw);
  return createRecord(deviationKind, actor, 'deviation.raise', async (tx) => {
    const batch = await resolveBatches(tx, input);
    const held = sortedIds(input.heldBatchIds);
    return {
      values: { ...draftColumns(input, batch), raisedBy: actor.id, ownerId: actor.id },
      async children(childTx, row) {
        if (held.length > 0) {
          await childTx.insert(deviationBatches).values(held.map((batchId) => ({ deviationId: row.id, batchId, onHold: true })));
        }
        return held.length > 0 ? diffFields({ heldBatchIds: [] }, { heldBatchIds: held }, ['heldBatchIds']) : [];
      },
    };
  });
}

/** Only the author edits their draft (the kind's "draft" section). */
export async function updateDraft(actor: RecordActor, raw: UpdateDraftInput): Promise<DeviationOutcome> {
  const input = parseInput(updateDraftSchema, raw);
  return editRecord(deviationKind, {
    id: input.id,
    section: 'draft',
    actor,
    expectedVersion: input.version,
    action: 'update_draft',
    async apply(_row, { tx, related }) {
      const batch = await resolveBatches(tx, input);
      const heldBefore = related.held.filter((h) => h.onHold).map((h) => h.batchId);
      const heldAfter = sortedIds(input.heldBatchIds);
      await tx.delete(deviationBatches).where(eq(deviationBatches.deviationId, input.id));
      if (heldAfter.length > 0) {
        await tx.insert(deviationBatches).values(heldAfter.map((batchId) => ({ deviationId: input.id, batchId, onHold: true })));
      }
      return {
        changes: draftColumns(input, batch),
        audit: diffFields({ heldBatchIds: heldBefore }, { heldBatchIds: heldAfter }, ['heldBatchIds']),
      };
    },
  });
}

/** The author throws their draft away; it was never reported, so it stays theirs alone. */
export async function discardDraft(actor: RecordActor, raw: DeviationVersionInput & { reason?: string | null }): Promise<DeviationOutcome> {
  const input = parseInput(deviationVersionSchema, raw);
  return transitionRecord(deviationKind, { id: input.id, expectedVersion: input.version, event: 'discard', actor, reason: raw.reason ?? null });
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
  return editRecord(deviationKind, {
    id: input.id,
    section: 'triage',
    actor,
    expectedVersion: input.version,
    action: 'record_triage',
    async apply(before, { tx }) {
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
        throw fieldError('classificationReason', `The computed class is ${assessed.computed}: give a written justification for recording ${assessed.classification}.`);
      }
      if (input.investigatorId) {
        await assertCandidate(tx, input.investigatorId, { roles: ['qa_investigator'] }, { field: 'investigatorId', message: 'Pick an active QA investigator.' });
      }
      return {
        changes: {
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
      };
    },
  });
}

export async function assignInvestigation(actor: RecordActor, raw: DeviationVersionInput): Promise<DeviationOutcome> {
  const input = parseInput(deviationVersionSchema, raw);
  return transitionRecord(deviationKind, { id: input.id, expectedVersion: input.version, event: 'assign_investigation', actor });
}

/** The investigator signs as author of the investigation ("investigation complete"). */
export async function submitForApproval(actor: RecordActor, raw: SignedInput, options: SignOptions = {}): Promise<DeviationOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'submit_for_approval',
    actor,
    password: input.password,
    signer: options.signer,
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

/** The approver signs ("approved"); each held batch takes its disposition. */
export async function approveDeviation(actor: RecordActor, raw: SignedInput, options: SignOptions = {}): Promise<DeviationOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'approve',
    actor,
    password: input.password,
    signer: options.signer,
    // The kind's guard refuses it while a held batch has no disposition (21 CFR 211.192).
    changes: (_row, { now }) => ({ closedAt: now }),
  });
}

/** A minor deviation closed at triage, with a written justification and the approver's signature. */
export async function closeMinor(actor: RecordActor, raw: SignedReasonInput, options: SignOptions = {}): Promise<DeviationOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'close_minor',
    actor,
    reason: input.reason,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ closedAt: now, closureJustification: input.reason }),
  });
}

/**
 * Raised in error or twice. The holds this deviation placed are not lifted here: a batch leaves hold
 * only by a recorded disposition, never as a side effect of a cancellation.
 */
export async function cancelDeviation(actor: RecordActor, raw: SignedReasonInput, options: SignOptions = {}): Promise<DeviationOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(deviationKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'cancel',
    actor,
    reason: input.reason,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ cancelReason: input.reason, closedAt: now }),
  });
}
