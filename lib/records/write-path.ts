import 'server-only';
import { and, eq } from 'drizzle-orm';
import type { MySqlTable } from 'drizzle-orm/mysql-core';
import { type AnyStateMachine, initialTransition } from 'xstate';
import { db, type DbOrTx, type Tx } from '../../db/client';
import { stateHistory } from '../../db/schema';
import { diffFields, writeAudit } from '../audit';
import { assertCan, can, type Permission } from '../auth/permissions';
import { ConflictError, InvalidTransitionError, NotFoundError, ValidationError } from '../errors';
import { type SignatureDto, type VerifiedSigner, sign, verifySigner } from '../signatures';
import {
  type AnyRecordKind,
  type DtoOf,
  type EffectContext,
  type EventOf,
  type InsertOf,
  type RecordActor,
  type RowOf,
  allowedEventsFor,
  eventLabel,
  ownerScope,
  stateLabel,
} from './kind';
import { allocateNumber } from './numbers';
import type { NumberedRecordType } from './types';
import { type AllowedEvent, type EffectRequest, type EventPlan, planEvent, resolveSnapshot } from './workflow';

/*
 * The one write path. Every change to a workflow record goes through transitionRecord (or
 * createRecord for a new one), whether it comes from a server action, a route handler or an
 * e-mail link:
 *
 *   refuse early without locks (and, when the event needs a signature, check the password
 *   before any transaction opens, so a wrong one is counted even though nothing is saved);
 *   then in one transaction: lock the row, check again (visibility, permission, version, the
 *   machine's can/guards, reason), compute the next state with XState's pure transition, update
 *   WHERE id, status and version are as read, re-read, write state history, audit entry,
 *   signature and the machine's in-transaction effects; after commit, run the rest.
 */

export interface TransitionRequest<K extends AnyRecordKind> {
  id: number;
  /** The version the person saw; anything else is a conflict and nothing is overwritten. */
  expectedVersion: number;
  event: EventOf<K>;
  actor: RecordActor;
  reason?: string | null;
  /** Needed when the transition asks for a signature (21 CFR 11.200(a)). */
  password?: string | null;
  /**
   * Column changes the event makes besides status and version (e.g. retired_at), computed from
   * the locked row. May also write other tables through `tx`, inside the same transaction.
   */
  changes?: (row: RowOf<K>, at: { tx: Tx; now: Date }) => Partial<InsertOf<K>> | Promise<Partial<InsertOf<K>>>;
}

export interface WriteOutcome<K extends AnyRecordKind> {
  record: DtoOf<K>;
  /** The events the same actor may send next, with what each asks of them. */
  allowedEvents: AllowedEvent<EventOf<K>>[];
  /** The signature this write executed, if it needed one. */
  signature: SignatureDto | null;
}

type OkPlan = Extract<EventPlan, { ok: true }>;

const capitalised = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

async function readRow<K extends AnyRecordKind>(
  dbOrTx: DbOrTx,
  kind: K,
  id: number,
  lock: boolean,
): Promise<RowOf<K> | undefined> {
  const query = dbOrTx
    .select()
    .from(kind.table as MySqlTable)
    .where(eq(kind.table.id, id));
  const rows = lock ? await query.for('update') : await query;
  return rows[0] as RowOf<K> | undefined;
}

/** Every refusal the write path can give, in the order a person would want to hear them. */
function checkTransition<K extends AnyRecordKind>(
  kind: K,
  req: TransitionRequest<K>,
  reason: string | null,
  row: RowOf<K> | undefined,
): OkPlan {
  const scope = row ? ownerScope(kind, row) : null;
  if (!row || !scope || !can(req.actor, kind.readPermission, scope)) {
    throw new NotFoundError(`This ${kind.noun}`);
  }
  const permission = (kind.eventPermissions as Record<string, Permission | undefined>)[req.event];
  if (!permission) throw new ValidationError(`"${req.event}" is not an action on a ${kind.noun}.`);
  assertCan(req.actor, permission, scope);
  if (row.version !== req.expectedVersion) throw new ConflictError();

  const state = String(row.status);
  const snapshot = resolveSnapshot(kind.machine, state, kind.context(row));
  const plan = planEvent(kind.machine, snapshot, { type: req.event, actor: { id: req.actor.id, role: req.actor.role } });
  if (!plan.ok) {
    if (plan.problem === 'not_in_this_state') {
      throw new InvalidTransitionError(
        `"${eventLabel(kind, req.event)}" is not possible while this ${kind.noun} is ${stateLabel(kind, state).toLowerCase()}.`,
      );
    }
    throw new InvalidTransitionError(
      (plan.guard && kind.guardRefusals[plan.guard]) || `You may not ${eventLabel(kind, req.event).toLowerCase()} this ${kind.noun}.`,
    );
  }
  const fieldErrors: Record<string, string[]> = {};
  if (plan.rules.reasonRequired && !reason) fieldErrors.reason = ['Give the reason for this change.'];
  if (plan.rules.signature && !req.password) fieldErrors.password = ['Enter your password to sign.'];
  if (Object.keys(fieldErrors).length > 0) {
    throw new ValidationError('Some required information is missing.', fieldErrors);
  }
  return plan;
}

async function runInTransaction<K extends AnyRecordKind>(
  tx: Tx,
  kind: K,
  requests: EffectRequest[],
  base: Omit<EffectContext<RowOf<K>>, 'params'>,
): Promise<void> {
  for (const r of requests) {
    await kind.effects?.[r.type]?.inTransaction?.(tx, { ...base, params: r.params });
  }
}

/** After commit the change stands; a failing follow-up is logged, never reported as a failed save. */
async function runAfterCommit<K extends AnyRecordKind>(
  kind: K,
  requests: EffectRequest[],
  base: Omit<EffectContext<RowOf<K>>, 'params'>,
): Promise<void> {
  for (const r of requests) {
    try {
      await kind.effects?.[r.type]?.afterCommit?.({ ...base, params: r.params });
    } catch (err) {
      console.error(`[effects] ${kind.recordType} ${base.event} → ${r.type} failed after commit`, err);
    }
  }
}

export async function transitionRecord<K extends AnyRecordKind>(
  kind: K,
  req: TransitionRequest<K>,
): Promise<WriteOutcome<K>> {
  const reason = req.reason?.trim() || null;

  const preflight = checkTransition(kind, req, reason, await readRow(db, kind, req.id, false));
  let signer: VerifiedSigner | null = null;
  if (preflight.rules.signature) signer = await verifySigner(req.actor.id, req.password);

  const done = await db.transaction(async (tx) => {
    const before = await readRow(tx, kind, req.id, true);
    const plan = checkTransition(kind, req, reason, before);
    if (!before || (plan.rules.signature && !signer)) throw new ConflictError();

    const now = new Date();
    const extra = (await req.changes?.(before, { tx, now })) ?? {};
    const version = Number(before.version) + 1;
    const table = kind.table;
    const [result] = await tx
      .update(table as MySqlTable)
      .set({ ...extra, status: plan.nextState, version } as Record<string, unknown>)
      .where(and(eq(table.id, req.id), eq(table.status, before.status), eq(table.version, req.expectedVersion)));
    if (result.affectedRows !== 1) throw new ConflictError();
    const after = (await readRow(tx, kind, req.id, false))!;

    await tx.insert(stateHistory).values({
      recordType: kind.recordType,
      recordId: req.id,
      event: req.event,
      fromState: String(before.status),
      toState: plan.nextState,
      userId: req.actor.id,
      comment: reason,
      at: now,
    });
    await writeAudit(tx, {
      actor: { id: req.actor.id, name: req.actor.name },
      recordType: kind.recordType,
      recordId: req.id,
      action: req.event,
      changes: diffFields(before, after, ['status', ...kind.auditFields]),
      reason,
    });
    const signature =
      plan.rules.signature && signer
        ? await sign(tx, signer, {
            recordType: kind.recordType,
            recordId: req.id,
            recordVersion: version,
            content: kind.signedContent(after),
            meaning: plan.rules.signature,
            reason,
          })
        : null;
    const base = { actor: req.actor, recordType: kind.recordType, event: req.event, before, after };
    await runInTransaction(tx, kind, plan.effects, base);
    return { after, signature, effects: plan.effects, base };
  });

  await runAfterCommit(kind, done.effects, done.base);
  return {
    record: kind.toDto(done.after) as DtoOf<K>,
    allowedEvents: allowedEventsFor(kind, req.actor, done.after),
    signature: done.signature,
  };
}

export interface CreateRequest<K extends AnyRecordKind> {
  actor: RecordActor;
  /** The permission creating this kind needs, e.g. 'deviation.raise'. */
  permission: Permission;
  /** Column values; status and version come from the machine and the path, number from `number`. */
  values: { [P in keyof InsertOf<K> as P extends 'id' | 'status' | 'version' | 'number' ? never : P]: InsertOf<K>[P] };
  /** Allocate a human number into the `number` column; the year defaults to the current UTC year. */
  number?: { type: NumberedRecordType; year?: number };
  reason?: string | null;
}

/**
 * Inserts a new record inside the caller's transaction: number, row, history and audit entry.
 * Returns the row and the follow-ups to run once the caller has committed.
 */
export async function insertRecord<K extends AnyRecordKind>(
  tx: Tx,
  kind: K,
  req: CreateRequest<K>,
): Promise<{ row: RowOf<K>; afterCommit: () => Promise<void> }> {
  assertCan(req.actor, req.permission);
  const [initial, actions] = initialTransition(kind.machine as AnyStateMachine);
  if (typeof initial.value !== 'string') throw new Error(`workflow ${kind.machine.id} is not flat`);
  const status = initial.value;

  const values: Record<string, unknown> = { ...req.values, status, version: 1 };
  if (req.number) {
    if (!('number' in kind.table)) throw new Error(`${kind.recordType} has no number column`);
    values.number = await allocateNumber(tx, req.number.type, req.number.year ?? new Date().getUTCFullYear());
  }
  const [inserted] = await tx
    .insert(kind.table as MySqlTable)
    .values(values)
    .$returningId();
  const id = Number((inserted as { id: number }).id);
  const row = (await readRow(tx, kind, id, false))!;
  const reason = req.reason?.trim() || null;

  await tx.insert(stateHistory).values({
    recordType: kind.recordType,
    recordId: id,
    event: 'create',
    fromState: null,
    toState: status,
    userId: req.actor.id,
    comment: reason,
    at: new Date(),
  });
  const auditFields = [...(req.number ? ['number'] : []), 'status', ...kind.auditFields];
  await writeAudit(tx, {
    actor: { id: req.actor.id, name: req.actor.name },
    recordType: kind.recordType,
    recordId: id,
    action: 'create',
    changes: diffFields(null, row, auditFields),
    reason,
  });
  const effects = actions
    .filter((a) => !a.type.startsWith('xstate.'))
    .map((a) => ({ type: a.type, params: a.params }));
  const base = { actor: req.actor, recordType: kind.recordType, event: 'create', before: null, after: row };
  await runInTransaction(tx, kind, effects, base);
  return { row, afterCommit: () => runAfterCommit(kind, effects, base) };
}

export async function createRecord<K extends AnyRecordKind>(kind: K, req: CreateRequest<K>): Promise<WriteOutcome<K>> {
  const { row, afterCommit } = await db.transaction((tx) => insertRecord(tx, kind, req));
  await afterCommit();
  return {
    record: kind.toDto(row) as DtoOf<K>,
    allowedEvents: allowedEventsFor(kind, req.actor, row),
    signature: null,
  };
}
