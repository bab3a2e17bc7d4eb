import 'server-only';
import { and, eq, ne } from 'drizzle-orm';
import { db, type Tx } from '../../db/client';
import { capaActions, capas, complaints, deviations, recordLinks, users } from '../../db/schema';
import { type FieldChange, diffFields, writeAudit } from '../audit';
import { assertCan, can } from '../auth/permissions';
import { ConflictError, InvalidTransitionError, NotFoundError, ValidationError } from '../errors';
import { type RecordActor, allowedEventsFor, ownerScope } from '../records/kind';
import { type WriteOutcome, insertRecord, transitionRecord } from '../records/write-path';
import { parseInput } from '../validation/parse';
import { type CapaRow, activeUsers, capaAuditFields, capaKind, eligibleApprovers, mailAboutCapa, planApprovalMail } from './kind';
import { cleanEvidence } from './evidence-text';
import { capaActionCategoryLabels, capaStateLabels } from './labels';
import {
  type AddActionInput,
  type CapaVersionInput,
  type CompleteActionInput,
  type CreateCapaInput,
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
  serializeRecurrenceCriterion,
  signedReasonSchema,
  signedSchema,
  updateActionSchema,
  updatePlanSchema,
} from './schemas';

/*
 * CAPA commands. Lifecycle events go through the write path (transitionRecord), which checks role,
 * record, version and the machine's guards. The plan and its actions are edits, not transitions:
 * each locks the CAPA row, checks the same things, keeps the CAPA's action counters in step (the
 * guards read them) and audits every changed field, the actions' included, in the same transaction
 * (21 CFR 11.10(e)). Every action change bumps the CAPA's version, so a plan someone is signing
 * cannot change under them unnoticed.
 */

export type CapaOutcome = WriteOutcome<typeof capaKind>;
export type CapaActionRow = typeof capaActions.$inferSelect;

/** The relation a source record has to the CAPA it raised (record_links.relation). */
export const raisedCapaRelation = 'raised_capa';

const outcome = (actor: RecordActor, row: CapaRow): CapaOutcome => ({
  record: capaKind.toDto(row),
  allowedEvents: allowedEventsFor(capaKind, actor, row),
  signature: null,
});

/** A CAPA owner plans and runs it: an active QA investigator (capa.plan). */
async function assertOwnerCandidate(tx: Tx, ownerId: number): Promise<void> {
  const [owner] = await tx
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.id, ownerId), eq(users.role, 'qa_investigator'), eq(users.active, true)));
  if (!owner) {
    const message = 'Pick an active QA investigator as the owner.';
    throw new ValidationError(message, { ownerId: [message] });
  }
}

/** An action can be given to anyone who works on the site: any active user but an administrator. */
async function assertActionOwner(tx: Tx, ownerId: number): Promise<{ id: number; email: string }> {
  const [owner] = await tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(eq(users.id, ownerId), eq(users.active, true), ne(users.role, 'admin')));
  if (!owner) {
    const message = 'Pick an active person to do this action.';
    throw new ValidationError(message, { ownerId: [message] });
  }
  return owner;
}

export interface NewCapa {
  title: string;
  sourceType: CapaRow['sourceType'];
  sourceId: number | null;
  problemStatement: string;
  rootCause: string | null;
  ownerId: number;
  dueAt?: Date | null;
}

/**
 * Inserts a proposed CAPA inside the caller's transaction: CAPA number, row, history, audit entry,
 * the owner's notice, and the link from its source record. For callers that raise a CAPA as part of
 * another change (a deviation's investigation); the permission is capa.create.
 */
export async function insertCapa(tx: Tx, actor: RecordActor, input: NewCapa, reason?: string | null) {
  const created = await insertRecord(tx, capaKind, {
    actor,
    permission: 'capa.create',
    number: { type: 'capa' },
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
  });
  if (input.sourceType !== 'trend' && input.sourceId !== null) {
    await tx.insert(recordLinks).values({
      fromType: input.sourceType,
      fromId: input.sourceId,
      toType: 'capa',
      toId: created.row.id,
      relation: raisedCapaRelation,
      createdBy: actor.id,
    });
  }
  return created;
}

/** A CAPA raised by QA from a deviation, a complaint or a trend, linked back to its source. */
export async function createCapa(actor: RecordActor, raw: CreateCapaInput): Promise<CapaOutcome> {
  const input = parseInput(createCapaSchema, raw);
  assertCan(actor, 'capa.create');
  const { row, afterCommit } = await db.transaction(async (tx) => {
    await assertOwnerCandidate(tx, input.ownerId);
    let rootCause = input.rootCause ?? null;
    if (input.sourceType === 'deviation') {
      const [source] = await tx
        .select({ id: deviations.id, status: deviations.status, rootCause: deviations.rootCause })
        .from(deviations)
        .where(eq(deviations.id, input.sourceId!));
      // A draft is its author's notebook; a CAPA follows from a reported deviation.
      if (!source || source.status === 'draft') {
        throw new ValidationError('Pick a reported deviation.', { sourceId: ['No reported deviation has this id.'] });
      }
      // ICH Q10 3.2.2: the action follows from the investigation's root cause; carry it over unless given.
      rootCause ??= source.rootCause?.trim() || null;
    } else if (input.sourceType === 'complaint') {
      const [source] = await tx.select({ id: complaints.id }).from(complaints).where(eq(complaints.id, input.sourceId!));
      if (!source) throw new ValidationError('Pick a complaint.', { sourceId: ['No complaint has this id.'] });
    }
    return insertCapa(tx, actor, {
      title: input.title,
      sourceType: input.sourceType,
      sourceId: input.sourceType === 'trend' ? null : input.sourceId!,
      problemStatement: input.problemStatement,
      rootCause,
      ownerId: input.ownerId,
      dueAt: input.dueAt ?? null,
    });
  });
  await afterCommit();
  return outcome(actor, row);
}

/**
 * Locks the CAPA and checks, in the order a person wants to hear them: it exists and they may read
 * it, they may do this, it is in a state where this is done, nobody changed it since (when a version
 * is given).
 */
async function lockCapa(
  tx: Tx,
  actor: RecordActor,
  id: number,
  version: number | null,
  permission: 'capa.plan' | 'capa.complete_action' | 'capa.read',
  states: readonly CapaRow['status'][],
  what: string,
): Promise<CapaRow> {
  const [row] = await tx.select().from(capas).where(eq(capas.id, id)).for('update');
  const scope = row ? ownerScope(capaKind, row) : null;
  if (!row || !scope || !can(actor, 'capa.read', scope)) throw new NotFoundError('This CAPA');
  if (permission === 'capa.plan') assertCan(actor, permission, scope);
  if (!states.includes(row.status)) {
    const where = states.map((s) => capaStateLabels[s].toLowerCase()).join(' or ');
    throw new InvalidTransitionError(`${what} is possible only while the CAPA is ${where}; it is ${capaStateLabels[row.status].toLowerCase()} now.`);
  }
  if (version !== null && row.version !== version) throw new ConflictError();
  return row;
}

async function saveCapa(
  tx: Tx,
  actor: RecordActor,
  before: CapaRow,
  changes: Partial<typeof capas.$inferInsert>,
  action: string,
  extraChanges: FieldChange[] = [],
  reason: string | null = null,
): Promise<CapaRow> {
  const [result] = await tx
    .update(capas)
    .set({ ...changes, version: before.version + 1 })
    .where(and(eq(capas.id, before.id), eq(capas.version, before.version)));
  if (result.affectedRows !== 1) throw new ConflictError();
  const [after] = await tx.select().from(capas).where(eq(capas.id, before.id));
  await writeAudit(tx, {
    actor: { id: actor.id, name: actor.name },
    recordType: 'capa',
    recordId: before.id,
    action,
    changes: [...diffFields(before, after!, capaAuditFields), ...extraChanges],
    reason,
  });
  return after!;
}

/** The plan: problem, root cause, effectiveness criteria (text and recurrence), owner and due date. */
export async function updatePlan(actor: RecordActor, raw: UpdatePlanInput): Promise<CapaOutcome> {
  const input = parseInput(updatePlanSchema, raw);
  const after = await db.transaction(async (tx) => {
    const before = await lockCapa(tx, actor, input.id, input.version, 'capa.plan', ['proposed'], 'Editing the plan');
    if (input.ownerId !== before.ownerId) await assertOwnerCandidate(tx, input.ownerId);
    const saved = await saveCapa(
      tx,
      actor,
      before,
      {
        title: input.title,
        problemStatement: input.problemStatement,
        rootCause: input.rootCause ?? null,
        effectivenessCriteria: input.effectivenessCriteria ?? null,
        recurrenceCriterion: serializeRecurrenceCriterion(criterionFromFields(input)),
        ownerId: input.ownerId,
        dueAt: input.dueAt ?? null,
      },
      'update_plan',
    );
    if (saved.ownerId !== before.ownerId) {
      await capaKind.effects!.notifyOwnerAssigned!.inTransaction!(tx, {
        actor,
        recordType: 'capa',
        event: 'update_plan',
        before,
        after: saved,
        params: undefined,
      });
    }
    return saved;
  });
  return outcome(actor, after);
}

/**
 * Asks the QA approvers who may sign (not the owner) to approve the plan. Not a transition: the plan
 * stays open to edits, and approving it is what moves the CAPA on. Refused while the plan could not
 * be approved anyway.
 */
export async function requestPlanApproval(actor: RecordActor, raw: CapaVersionInput): Promise<CapaOutcome> {
  const input = parseInput(capaVersionSchema, raw);
  const row = await db.transaction(async (tx) => {
    const capa = await lockCapa(tx, actor, input.id, input.version, 'capa.plan', ['proposed'], 'Asking for plan approval');
    const missing: Record<string, string[]> = {};
    if (capa.actionsPlanned === 0) missing.actions = ['Add at least one action.'];
    if (!capa.effectivenessCriteria?.trim()) missing.effectivenessCriteria = ['Write the effectiveness criteria.'];
    if (Object.keys(missing).length > 0) {
      throw new ValidationError(`Complete the plan first: ${Object.values(missing).flat().join(' ')}`, missing);
    }
    await mailAboutCapa(tx, await eligibleApprovers(tx, capa), actor, capa, planApprovalMail(actor, capa));
    await writeAudit(tx, {
      actor: { id: actor.id, name: actor.name },
      recordType: 'capa',
      recordId: capa.id,
      action: 'request_plan_approval',
      changes: [],
    });
    return capa;
  });
  return outcome(actor, row);
}

const actionAuditFields = ['kind', 'category', 'description', 'ownerId', 'dueAt', 'round', 'completedAt', 'completedBy', 'evidence'] as const;

/** An action's field changes, named "action 12 · description" so they read inside the CAPA's own trail. */
function actionChanges(before: CapaActionRow | null, after: CapaActionRow): FieldChange[] {
  return diffFields(before, after, actionAuditFields).map((c) => ({ ...c, field: `action ${after.id} · ${c.field}` }));
}

async function mailActionOwner(tx: Tx, actor: RecordActor, capa: CapaRow, action: CapaActionRow): Promise<void> {
  const recipients = await activeUsers(tx, [action.ownerId]);
  await mailAboutCapa(tx, recipients, actor, capa, {
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
  const after = await db.transaction(async (tx) => {
    const before = await lockCapa(tx, actor, input.id, input.version, 'capa.plan', ['proposed'], 'Adding an action');
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
    const saved = await saveCapa(
      tx,
      actor,
      before,
      { actionsPlanned: before.actionsPlanned + 1, actionsOpen: before.actionsOpen + 1, actionsCompletedAt: null },
      'add_action',
      actionChanges(null, action!),
    );
    await mailActionOwner(tx, actor, saved, action!);
    return saved;
  });
  return outcome(actor, after);
}

async function lockAction(tx: Tx, capa: CapaRow, actionId: number): Promise<CapaActionRow> {
  const [action] = await tx.select().from(capaActions).where(eq(capaActions.id, actionId)).for('update');
  if (!action || action.capaId !== capa.id) throw new NotFoundError('This action');
  if (action.round !== capa.planRound) {
    throw new InvalidTransitionError('This action belongs to an earlier round of the plan; it stays on record as it is.');
  }
  return action;
}

/** Changes an action of the plan being written; only while planning, and never a completed one. */
export async function updateAction(actor: RecordActor, raw: UpdateActionInput): Promise<CapaOutcome> {
  const input = parseInput(updateActionSchema, raw);
  const after = await db.transaction(async (tx) => {
    const before = await lockCapa(tx, actor, input.id, input.version, 'capa.plan', ['proposed'], 'Changing an action');
    const action = await lockAction(tx, before, input.actionId);
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
      .where(and(eq(capaActions.id, action.id), eq(capaActions.version, action.version)));
    const [changed] = await tx.select().from(capaActions).where(eq(capaActions.id, action.id));
    const saved = await saveCapa(tx, actor, before, {}, 'update_action', actionChanges(action, changed!));
    if (changed!.ownerId !== action.ownerId) await mailActionOwner(tx, actor, saved, changed!);
    return saved;
  });
  return outcome(actor, after);
}

const dayMs = 86_400_000;

/**
 * The action's owner records it as done, with the evidence (21 CFR 820.100(a)(7): activities and
 * their results documented). The evidence is rich text, cleaned here before it is saved; the audit
 * entry carries the whole saved text (21 CFR 11.10(e)). Files go to the CAPA's Evidence section
 * (lib/attachments). When it is the last open action of the plan, the CAPA notes the time: the
 * recurrence count and the effectiveness period start there.
 */
export async function completeAction(actor: RecordActor, raw: CompleteActionInput): Promise<CapaOutcome> {
  const input = parseInput(completeActionSchema, raw);
  const evidence = cleanEvidence(input.evidence);
  if (!evidence.ok) throw new ValidationError(evidence.message, { evidence: [evidence.message] });
  const after = await db.transaction(async (tx) => {
    const before = await lockCapa(tx, actor, input.id, null, 'capa.read', ['implementation'], 'Completing an action');
    const action = await lockAction(tx, before, input.actionId);
    assertCan(actor, 'capa.complete_action', { ownerIds: [action.ownerId] });
    if (action.version !== input.actionVersion) throw new ConflictError();
    if (action.completedAt !== null) throw new InvalidTransitionError('This action is already recorded as completed.');
    const now = new Date();
    const [result] = await tx
      .update(capaActions)
      .set({ completedAt: now, completedBy: actor.id, evidence: evidence.html, version: action.version + 1 })
      .where(and(eq(capaActions.id, action.id), eq(capaActions.version, action.version)));
    if (result.affectedRows !== 1) throw new ConflictError();
    const [done] = await tx.select().from(capaActions).where(eq(capaActions.id, action.id));
    const actionsOpen = Math.max(0, before.actionsOpen - 1);
    const days = parseRecurrenceCriterion(before.recurrenceCriterion)?.days;
    return saveCapa(
      tx,
      actor,
      before,
      {
        actionsOpen,
        ...(actionsOpen === 0
          ? { actionsCompletedAt: now, effectivenessDueAt: days ? new Date(now.getTime() + days * dayMs) : before.effectivenessDueAt }
          : {}),
      },
      'complete_action',
      actionChanges(action, done!),
    );
  });
  return outcome(actor, after);
}

/** The QA approver signs the plan ("approved"); the plan is then fixed for this round. */
export async function approvePlan(actor: RecordActor, raw: SignedInput): Promise<CapaOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(capaKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'approve_plan',
    actor,
    password: input.password,
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
export interface SigningHooks {
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

export async function cancelCapa(actor: RecordActor, raw: SignedReasonInput): Promise<CapaOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(capaKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'cancel',
    actor,
    reason: input.reason,
    password: input.password,
    changes: (_row, { now }) => ({ cancelReason: input.reason, closedAt: now }),
  });
}
