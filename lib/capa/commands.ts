import 'server-only';
import { eq } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { capaActions, complaints, deviations, recordLinks } from '../../db/schema';
import { type FieldChange, diffFields } from '../audit';
import { ConflictError, InvalidTransitionError, NotFoundError, ValidationError, assertChanged, fieldError } from '../errors';
import { assertCandidate } from '../users/candidates';
import { activeUsers } from '../mail/record-notice';
import type { RecordActor } from '../records/kind';
import { type SignOptions, type WriteOutcome, createRecord, editRecord, insertRecord, transitionRecord } from '../records/write-path';
import { parseInput } from '../validation/parse';
import { type CapaActionRow, type CapaRow, capaKind, capaNotice, eligibleApprovers, planApprovalMail } from './kind';
import { cleanEvidence } from './evidence-text';
import { capaActionCategoryLabels } from './labels';
import {
  type AddActionInput,
  type CapaVersionInput,
  type CompleteActionInput,
  type CreateCapaInput,
  type ReassignOwnerInput,
  type SignedInput,
  type SignedReasonInput,
  type UpdateActionInput,
  type UpdatePlanInput,
  addActionSchema,
  capaVersionSchema,
  completeActionSchema,
  createCapaSchema,
  criterionFromFields,
  parseRecurrenceCriterion,
  reassignOwnerSchema,
  serializeRecurrenceCriterion,
  signedReasonSchema,
  signedSchema,
  updateActionSchema,
  updatePlanSchema,
} from './schemas';

/*
 * CAPA commands: what each event and each section edit changes. Who may do it and when are the
 * record kind's rules (lib/capa/kind.ts), checked by the write path on the locked CAPA. The plan
 * and its actions are section edits: each keeps the CAPA's action counters in step (lists read
 * them) and audits every changed field, the actions' included, in the same transaction
 * (21 CFR 11.10(e)). Every action change bumps the CAPA's version, so a plan someone is signing
 * cannot change under them unnoticed.
 */

export type CapaOutcome = WriteOutcome<typeof capaKind>;
export type { CapaActionRow };

/** The relation a source record has to the CAPA it raised (record_links.relation). */
export const raisedCapaRelation = 'raised_capa';

/** A CAPA owner plans and runs it: an active QA investigator (capa.plan). */
const assertOwnerCandidate = (tx: Tx, ownerId: number) =>
  assertCandidate(tx, ownerId, { roles: ['qa_investigator'] }, { field: 'ownerId', message: 'Pick an active QA investigator as the owner.' });

/** An action can be given to anyone who works on the site: any active user but an administrator. */
const assertActionOwner = (tx: Tx, ownerId: number) =>
  assertCandidate(tx, ownerId, { notRoles: ['admin'] }, { field: 'ownerId', message: 'Pick an active person to do this action.' });

export interface NewCapa {
  title: string;
  sourceType: CapaRow['sourceType'];
  sourceId: number | null;
  problemStatement: string;
  rootCause: string | null;
  ownerId: number;
  dueAt?: Date | null;
}

/** The insert of a proposed CAPA: its number, row and the link back from its source record. */
function newCapaRequest(actor: RecordActor, input: NewCapa, reason?: string | null) {
  return {
    number: { type: 'capa' as const },
    reason: reason ?? null,
    values: {
      title: input.title,
      sourceType: input.sourceType,
      sourceId: input.sourceId,
      problemStatement: input.problemStatement,
      rootCause: input.rootCause,
      ownerId: input.ownerId,
      createdBy: actor.id,
      dueAt: input.dueAt ?? null,
    },
    async children(tx: Tx, row: CapaRow) {
      if (input.sourceType !== 'trend' && input.sourceId !== null) {
        await tx.insert(recordLinks).values({
          fromType: input.sourceType,
          fromId: input.sourceId,
          toType: 'capa',
          toId: row.id,
          relation: raisedCapaRelation,
          createdBy: actor.id,
        });
      }
    },
  };
}

/**
 * Inserts a proposed CAPA inside the caller's write transaction: CAPA number, row, history, audit
 * entry, the owner's notice, and the link from its source record. For callers that raise a CAPA as
 * part of another change (a deviation's investigation, a complaint's); the permission is capa.create.
 */
export async function insertCapa(tx: Tx, actor: RecordActor, input: NewCapa, reason?: string | null) {
  return insertRecord(tx, capaKind, { actor, permission: 'capa.create', ...newCapaRequest(actor, input, reason) });
}

/** A CAPA raised by QA from a deviation, a complaint or a trend, linked back to its source. */
export async function createCapa(actor: RecordActor, raw: CreateCapaInput): Promise<CapaOutcome> {
  const input = parseInput(createCapaSchema, raw);
  return createRecord(capaKind, actor, 'capa.create', async (tx) => {
    await assertOwnerCandidate(tx, input.ownerId);
    let rootCause = input.rootCause ?? null;
    if (input.sourceType === 'deviation') {
      const [source] = await tx
        .select({ id: deviations.id, status: deviations.status, rootCause: deviations.rootCause })
        .from(deviations)
        .where(eq(deviations.id, input.sourceId!));
      // A CAPA follows from a reported deviation; a draft (or a discarded one) is its author's notebook.
      if (!source || source.status === 'draft' || source.status === 'discarded') {
        throw new ValidationError('Pick a reported deviation.', { sourceId: ['No reported deviation has this id.'] });
      }
      // ICH Q10 3.2.2: the action follows from the investigation's root cause; carry it over unless given.
      rootCause ??= source.rootCause?.trim() || null;
    } else if (input.sourceType === 'complaint') {
      const [source] = await tx.select({ id: complaints.id }).from(complaints).where(eq(complaints.id, input.sourceId!));
      if (!source) throw new ValidationError('Pick a complaint.', { sourceId: ['No complaint has this id.'] });
    }
    return newCapaRequest(actor, {
      title: input.title,
      sourceType: input.sourceType,
      sourceId: input.sourceType === 'trend' ? null : input.sourceId!,
      problemStatement: input.problemStatement,
      rootCause,
      ownerId: input.ownerId,
      dueAt: input.dueAt ?? null,
    });
  });
}

/** The plan: problem, root cause, effectiveness criteria (text and recurrence) and due date, by its owner. */
export async function updatePlan(actor: RecordActor, raw: UpdatePlanInput): Promise<CapaOutcome> {
  const input = parseInput(updatePlanSchema, raw);
  return editRecord(capaKind, {
    id: input.id,
    section: 'plan',
    actor,
    expectedVersion: input.version,
    action: 'update_plan',
    apply(before) {
      if (input.ownerId !== undefined && input.ownerId !== before.ownerId) {
        throw fieldError('ownerId', 'The owner is changed with “Reassign the owner”, not with the plan.');
      }
      return {
        changes: {
          title: input.title,
          problemStatement: input.problemStatement,
          rootCause: input.rootCause ?? null,
          effectivenessCriteria: input.effectivenessCriteria ?? null,
          recurrenceCriterion: serializeRecurrenceCriterion(criterionFromFields(input)),
          dueAt: input.dueAt ?? null,
        },
      };
    },
  });
}

/** Hands the CAPA to another QA investigator (a QA approver, or the owner themselves), who is told by e-mail. */
export async function reassignOwner(actor: RecordActor, raw: ReassignOwnerInput): Promise<CapaOutcome> {
  const input = parseInput(reassignOwnerSchema, raw);
  return editRecord(capaKind, {
    id: input.id,
    section: 'owner',
    actor,
    expectedVersion: input.version,
    action: 'reassign_owner',
    reason: input.reason,
    async apply(before, { tx }) {
      assertChanged('ownerId', before.ownerId, input.ownerId, 'This person owns the CAPA already.');
      await assertOwnerCandidate(tx, input.ownerId);
      const next = { ...before, ownerId: input.ownerId, version: before.version + 1 };
      await capaNotice(tx, next, await activeUsers(tx, [input.ownerId]), actor, {
        key: 'capa-owner',
        template: 'capa_owner_assigned',
        subject: `CAPA ${before.number} assigned to you`,
        heading: `You own ${before.number}`,
        paragraphs: [`${actor.name} made you the owner of CAPA ${before.number}: ${before.title}.`, `Reason: ${input.reason}`],
        footer: 'You receive this because you are the owner of this CAPA.',
      });
      return { changes: { ownerId: input.ownerId } };
    },
  });
}

/**
 * Asks the QA approvers who may sign (lib/capa/kind.ts) to approve the plan. Not a transition: the
 * plan stays open to edits, and approving it is what moves the CAPA on. Refused while the plan
 * could not be approved anyway.
 */
export async function requestPlanApproval(actor: RecordActor, raw: CapaVersionInput): Promise<CapaOutcome> {
  const input = parseInput(capaVersionSchema, raw);
  return editRecord(capaKind, {
    id: input.id,
    section: 'approval_request',
    actor,
    expectedVersion: input.version,
    action: 'request_plan_approval',
    async apply(capa, { tx, related }) {
      const planned = related.actions.filter((a) => a.round === capa.planRound).length;
      const missing: Record<string, string[]> = {};
      if (planned === 0) missing.actions = ['Add at least one action.'];
      if (!capa.effectivenessCriteria?.trim()) missing.effectivenessCriteria = ['Write the effectiveness criteria.'];
      if (Object.keys(missing).length > 0) {
        throw new ValidationError(`Complete the plan first: ${Object.values(missing).flat().join(' ')}`, missing);
      }
      await capaNotice(tx, capa, await eligibleApprovers(tx, capa, 'approve_plan'), actor, planApprovalMail(actor, capa, planned));
      return {};
    },
  });
}

const actionAuditFields = ['kind', 'category', 'description', 'ownerId', 'dueAt', 'round', 'completedAt', 'completedBy', 'evidence'] as const;

/** An action's field changes, named "action 12 · description" so they read inside the CAPA's own trail. */
function actionChanges(before: CapaActionRow | null, after: CapaActionRow): FieldChange[] {
  return diffFields(before, after, actionAuditFields).map((c) => ({ ...c, field: `action ${after.id} · ${c.field}` }));
}

async function mailActionOwner(tx: Tx, actor: RecordActor, capa: Pick<CapaRow, 'id' | 'number' | 'version' | 'title'>, action: CapaActionRow): Promise<void> {
  await capaNotice(tx, capa, await activeUsers(tx, [action.ownerId]), actor, {
    key: `capa-action-${action.id}`,
    template: 'capa_action_assigned',
    subject: `CAPA ${capa.number}: an action for you, due ${action.dueAt.toISOString().slice(0, 10)}`,
    heading: `An action of ${capa.number} is yours`,
    paragraphs: [
      `${actor.name} gave you an action of CAPA ${capa.number}: ${capa.title}.`,
      `${capaActionCategoryLabels[action.category as keyof typeof capaActionCategoryLabels] ?? action.category}: ${action.description}`,
      `Due ${action.dueAt.toISOString().slice(0, 10)}. Record it as completed, with the evidence, once it is done.`,
    ],
    footer: 'You receive this because you own this action.',
  });
}

/** A corrective or preventive action of the current plan round, while the CAPA is being planned. */
export async function addAction(actor: RecordActor, raw: AddActionInput): Promise<CapaOutcome> {
  const input = parseInput(addActionSchema, raw);
  return editRecord(capaKind, {
    id: input.id,
    section: 'actions',
    actor,
    expectedVersion: input.version,
    action: 'add_action',
    async apply(before, { tx }) {
      await assertActionOwner(tx, input.ownerId);
      const [inserted] = await tx
        .insert(capaActions)
        .values({
          capaId: before.id,
          kind: input.kind,
          category: input.category,
          description: input.description,
          ownerId: input.ownerId,
          dueAt: input.dueAt,
          round: before.planRound,
          createdBy: actor.id,
        })
        .$returningId();
      const [action] = await tx.select().from(capaActions).where(eq(capaActions.id, inserted!.id));
      await mailActionOwner(tx, actor, { ...before, version: before.version + 1 }, action!);
      return {
        changes: { actionsPlanned: before.actionsPlanned + 1, actionsOpen: before.actionsOpen + 1, actionsCompletedAt: null },
        audit: actionChanges(null, action!),
      };
    },
  });
}

async function currentAction(tx: Tx, capa: CapaRow, actionId: number): Promise<CapaActionRow> {
  const [action] = await tx.select().from(capaActions).where(eq(capaActions.id, actionId));
  if (!action || action.capaId !== capa.id) throw new NotFoundError('This action');
  if (action.round !== capa.planRound) {
    throw new InvalidTransitionError('This action belongs to an earlier round of the plan; it stays on record as it is.');
  }
  return action;
}

/** Changes an action of the plan being written; only while planning, and never a completed one. */
export async function updateAction(actor: RecordActor, raw: UpdateActionInput): Promise<CapaOutcome> {
  const input = parseInput(updateActionSchema, raw);
  return editRecord(capaKind, {
    id: input.id,
    section: 'actions',
    actor,
    expectedVersion: input.version,
    action: 'update_action',
    async apply(before, { tx }) {
      // The CAPA row is locked, and every change to its actions goes through it: the action cannot change under us.
      const action = await currentAction(tx, before, input.actionId);
      if (action.completedAt !== null) throw new InvalidTransitionError('This action is completed; it stays on record as it is.');
      if (input.ownerId !== action.ownerId) await assertActionOwner(tx, input.ownerId);
      await tx
        .update(capaActions)
        .set({
          kind: input.kind,
          category: input.category,
          description: input.description,
          ownerId: input.ownerId,
          dueAt: input.dueAt,
          version: action.version + 1,
        })
        .where(eq(capaActions.id, action.id));
      const [changed] = await tx.select().from(capaActions).where(eq(capaActions.id, action.id));
      if (changed!.ownerId !== action.ownerId) await mailActionOwner(tx, actor, { ...before, version: before.version + 1 }, changed!);
      return { audit: actionChanges(action, changed!) };
    },
  });
}

const dayMs = 86_400_000;

/**
 * The action's owner records it as done, with the evidence (21 CFR 820.100(a)(7): activities and
 * their results documented). The evidence is rich text, cleaned here before it is saved; the audit
 * entry carries the whole saved text (21 CFR 11.10(e)). Files go to the CAPA's Evidence section
 * (lib/attachments). When it is the last open action of the plan, the CAPA notes the time: the
 * recurrence count and the effectiveness period start there. The action carries its own version,
 * so the CAPA's is not asked for.
 */
export async function completeAction(actor: RecordActor, raw: CompleteActionInput): Promise<CapaOutcome> {
  const input = parseInput(completeActionSchema, raw);
  const evidence = cleanEvidence(input.evidence);
  if (!evidence.ok) throw new ValidationError(evidence.message, { evidence: [evidence.message] });
  return editRecord(capaKind, {
    id: input.id,
    section: 'completion',
    actor,
    expectedVersion: null,
    params: { actionId: input.actionId },
    action: 'complete_action',
    async apply(before, { tx, now }) {
      const action = await currentAction(tx, before, input.actionId);
      if (action.version !== input.actionVersion) throw new ConflictError();
      if (action.completedAt !== null) throw new InvalidTransitionError('This action is already recorded as completed.');
      await tx
        .update(capaActions)
        .set({ completedAt: now, completedBy: actor.id, evidence: evidence.html, version: action.version + 1 })
        .where(eq(capaActions.id, action.id));
      const [done] = await tx.select().from(capaActions).where(eq(capaActions.id, action.id));
      const actionsOpen = Math.max(0, before.actionsOpen - 1);
      const days = parseRecurrenceCriterion(before.recurrenceCriterion)?.days;
      return {
        changes: {
          actionsOpen,
          ...(actionsOpen === 0
            ? { actionsCompletedAt: now, effectivenessDueAt: days ? new Date(now.getTime() + days * dayMs) : before.effectivenessDueAt }
            : {}),
        },
        audit: actionChanges(action, done!),
      };
    },
  });
}

/** The QA approver signs the plan ("approved"); the plan is then fixed for this round. */
export async function approvePlan(actor: RecordActor, raw: SignedInput, options: SignOptions = {}): Promise<CapaOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(capaKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'approve_plan',
    actor,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ planApprovedAt: now }),
  });
}

export async function startImplementation(actor: RecordActor, raw: CapaVersionInput): Promise<CapaOutcome> {
  const input = parseInput(capaVersionSchema, raw);
  return transitionRecord(capaKind, { id: input.id, expectedVersion: input.version, event: 'start_implementation', actor });
}

/** Opens the check on demand, or from the worker (acting as the owner) once the criterion's period has run. */
export async function openEffectivenessCheck(actor: RecordActor, raw: CapaVersionInput & { reason?: string | null }): Promise<CapaOutcome> {
  const input = parseInput(capaVersionSchema, raw);
  return transitionRecord(capaKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'open_effectiveness_check',
    actor,
    reason: raw.reason ?? null,
    changes: (_row, { now }) => ({ effectivenessOpenedAt: now }),
  });
}

/**
 * Work that must commit or roll back with the effectiveness signature: an e-mail review link spends
 * its one-time token here (lib/capa/review-links.ts), so a used link never signs twice and a refused
 * signature (wrong password, conflict) leaves the link usable.
 */
export interface SigningHooks extends SignOptions {
  inTransaction?: (tx: Tx) => Promise<void>;
}

export async function recordEffective(actor: RecordActor, raw: SignedInput, hooks: SigningHooks = {}): Promise<CapaOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(capaKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'record_effective',
    actor,
    password: input.password,
    signer: hooks.signer,
    changes: async (_row, { tx, now }) => {
      await hooks.inTransaction?.(tx);
      return { effectivenessResult: 'effective', effectivenessNote: null, closedAt: now };
    },
  });
}

/**
 * Not effective: back to planning for a new round of actions. The actions of this round stay on
 * record, completed as they were; the counters start again for the new round.
 */
export async function recordNotEffective(actor: RecordActor, raw: SignedReasonInput, hooks: SigningHooks = {}): Promise<CapaOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(capaKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'record_not_effective',
    actor,
    reason: input.reason,
    password: input.password,
    signer: hooks.signer,
    changes: async (row, { tx }) => {
      await hooks.inTransaction?.(tx);
      return {
        effectivenessResult: 'not_effective',
        effectivenessNote: input.reason,
        planRound: row.planRound + 1,
        actionsPlanned: 0,
        actionsOpen: 0,
        actionsCompletedAt: null,
        planApprovedAt: null,
        effectivenessOpenedAt: null,
        effectivenessDueAt: null,
      };
    },
  });
}

export async function cancelCapa(actor: RecordActor, raw: SignedReasonInput, options: SignOptions = {}): Promise<CapaOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(capaKind, {
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
