import 'server-only';
import {  and, eq } from 'drizzle-orm';
import type { MySqlTable } from 'drizzle-orm/mysql-core';
import { type AnyStateMachine, initialTransition } from 'xstate';
import { db, type DbOrTx, type Tx } from '../../db/client';
import { stateHistory } from '../../db/schema';
import { type FieldChange, diffFields, writeAudit } from '../audit';
import { type Actor, assertCan, type Permission } from '../auth/permissions';
import { now } from '../clock';
import { ConflictError, ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '../errors';
import { type SignatureDto, type VerifiedSigner, sign, verifySigner } from '../signatures';
import type { SignatureMeaning } from '../signatures/meanings';
import {
  type AnyRecordKind,
  type DtoOf,
  type EffectContext,
  type EventOf,
  type InsertOf,
  type RecordAbilities,
  type RecordActor,
  type RelatedOf,
  type RowOf,
  type SectionOf,
  abilitiesOf,
  checkEvent,
  checkSection,
  isVisibleTo } from './kind';
import { allocateNumber } from './numbers';
import { readRow } from './rows';
import { writeTransaction } from './transaction';
import type { NumberedRecordType } from './types';
import type { EffectRequest } from './workflow';

/*
 * The one writer. Every change to a record goes through here, whether it comes from a server
 * action, a route handler, an e-mail link, the worker or the demo seed:
 *
 * - transitionRecord sends a lifecycle event;
 * - editRecord changes one section (the draft, the triage, the plan, the letter, the evidence ...);
 * - insertRecord / createRecord create one.
 *
 * Each reads the record FOR UPDATE and checks, in this order: the person may see it (otherwise it
 * is missing: 404, before anything else is said about it); their role may do this (403); nothing
 * they did on the record rules them out (segregation of duties, 403); the state allows it and the
 * machine's guards agree (409); nobody changed it since they read it (409); the input is complete
 * (422). Then it writes the row on id and version, history, the audit entry of every declared field,
 * the signature over what the meaning covers, and the outbox rows, in one transaction
 * (lib/records/transaction.ts retries it when the database breaks a deadlock), and after commit runs
 * the effects that only make sense once it has.
 */

export interface WriteOutcome<K extends AnyRecordKind> extends RecordAbilities<EventOf<K>, SectionOf<K>> {
  record: DtoOf<K>;
  /** The signature this write executed, if it needed one. */
  signature: SignatureDto | null;
}

type Related<K extends AnyRecordKind> = RelatedOf<K>;

export async function loadRelated<K extends AnyRecordKind>(kind: K, dbOrTx: DbOrTx, row: RowOf<K>): Promise<Related<K>> {
  return (kind.related ? await kind.related(dbOrTx, row) : {}) as Related<K>;
}

function notFound(kind: AnyRecordKind): NotFoundError {
  return new NotFoundError(`This ${kind.noun}`);
}

/** The record if this person may see it, else NotFoundError, exactly as for a record that does not exist. */
export async function getVisibleRow<K extends AnyRecordKind>(
  dbOrTx: DbOrTx,
  kind: K,
  id: number,
  actor: Actor,
  options: { lock?: boolean } = {},
): Promise<RowOf<K>> {
  const row = await readRow(dbOrTx, kind, id, options.lock ?? false);
  if (!row || !isVisibleTo(kind, actor, row)) throw notFound(kind);
  return row;
}

/** What this person may do to the record now (for DTOs), from the same rules the writer enforces. */
export async function abilitiesFor<K extends AnyRecordKind>(
  kind: K,
  actor: RecordActor,
  row: RowOf<K>,
  dbOrTx: DbOrTx = db,
): Promise<RecordAbilities<EventOf<K>, SectionOf<K>>> {
  return abilitiesOf(kind, actor, row, await loadRelated(kind, dbOrTx, row));
}

/** The content a signature of this meaning covers on this record now (for signing and for listing). */
export function signedContentOf<K extends AnyRecordKind>(kind: K, meaning: string, row: RowOf<K>, related: Related<K>): Record<string, unknown> | null {
  const content = (kind.signedContent as Record<string, ((r: RowOf<K>, rel: Related<K>) => Record<string, unknown>) | undefined> | undefined)?.[meaning];
  return content ? content(row, related) : null;
}

function refusalError(check: { status: 403 | 409; reason: string }): Error {
  return check.status === 403 ? new ForbiddenError(check.reason) : new InvalidTransitionError(check.reason);
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
      console.error(`[effects] ${kind.recordType} ${base.event} → ${r.type} failed after commit`, err instanceof Error ? err.message : err);
    }
  }
}

/**
 * For signing commands: a proof verifySigner gave the actor moments ago, instead of their password
 * (the demo seed signs many records and checks each demo password once).
 */
export interface SignOptions {
  signer?: VerifiedSigner;
}

// ── Lifecycle events ─────────────────────────────────────────────────────────────────────────────

export interface TransitionRequest<K extends AnyRecordKind> {
  id: number;
  /** The version the person saw; anything else is a conflict and nothing is overwritten. */
  expectedVersion: number;
  event: EventOf<K>;
  actor: RecordActor;
  reason?: string | null;
  /** Needed when the transition asks for a signature (21 CFR 11.200(a)). */
  password?: string | null;
  /** Instead of a password: a proof verifySigner gave this actor moments ago (the demo seed signs many records). */
  signer?: VerifiedSigner;
  /**
   * Column changes the event makes besides status and version (e.g. retired_at), computed from
   * the locked row. May also write other tables through `tx`, inside the same transaction, and
   * refuse with a ValidationError (nothing is then written).
   */
  changes?: (row: RowOf<K>, at: { tx: Tx; now: Date; related: Related<K> }) => Partial<InsertOf<K>> | Promise<Partial<InsertOf<K>>>;
}

function checkTransition<K extends AnyRecordKind>(
  kind: K,
  req: TransitionRequest<K>,
  reason: string | null,
  row: RowOf<K> | undefined,
  related: Related<K> | null,
) {
  if (!row || !isVisibleTo(kind, req.actor, row)) throw notFound(kind);
  const check = checkEvent(kind, req.actor, row, related as Related<K>, req.event);
  if (!check.ok) {
    // An event the kind does not know is bad input, not a refusal.
    if (!(kind.eventPermissions as Record<string, Permission> | undefined)?.[req.event]) {
      throw new ValidationError(`"${req.event}" is not an action on a ${kind.noun}.`);
    }
    // Someone else's change is why the state no longer fits: say that, not what it is now.
    if (check.status === 409 && Number(row.version) !== req.expectedVersion) throw new ConflictError();
    throw refusalError(check);
  }
  if (Number(row.version) !== req.expectedVersion) throw new ConflictError();
  const fieldErrors: Record<string, string[]> = {};
  if (check.plan.rules.reasonRequired && !reason) fieldErrors.reason = ['Give the reason for this change.'];
  if (check.plan.rules.signature && !req.password && !req.signer) fieldErrors.password = ['Enter your password to sign.'];
  if (Object.keys(fieldErrors).length > 0) throw new ValidationError('Some required information is missing.', fieldErrors);
  return check.plan;
}

export async function transitionRecord<K extends AnyRecordKind>(kind: K, req: TransitionRequest<K>): Promise<WriteOutcome<K>> {
  const reason = req.reason?.trim() || null;

  // Refuse without locks first, so a refusal costs nothing and a wrong password is never asked for.
  const seen = await readRow(db, kind, req.id, false);
  const preflight = checkTransition(kind, req, reason, seen, seen ? await loadRelated(kind, db, seen) : null);
  let signer: VerifiedSigner | null = null;
  if (preflight.rules.signature) {
    if (req.signer && req.signer.userId !== req.actor.id) throw new Error('a signer proof is for its own user only');
    // Outside any transaction, so a wrong password is counted and audited though nothing is saved (21 CFR 11.300(d)).
    signer = req.signer ?? (await verifySigner(req.actor.id, req.password));
  }

  const done = await writeTransaction(async (tx) => {
    const before = await readRow(tx, kind, req.id, true);
    const relatedBefore = before ? await loadRelated(kind, tx, before) : null;
    const plan = checkTransition(kind, req, reason, before, relatedBefore);
    if (!before || (plan.rules.signature && !signer)) throw new ConflictError();

    const at = now();
    const extra = (await req.changes?.(before, { tx, now: at, related: relatedBefore! })) ?? {};
    const version = Number(before.version) + 1;
    const table = kind.table;
    const [result] = await tx
      .update(table as MySqlTable)
      .set({ ...extra, status: plan.nextState, version } as Record<string, unknown>)
      .where(and(eq(table.id, req.id), eq(table.status, before.status), eq(table.version, req.expectedVersion)));
    if (result.affectedRows !== 1) throw new ConflictError();
    const after = (await readRow(tx, kind, req.id, false))!;
    const relatedAfter = await loadRelated(kind, tx, after);

    await tx.insert(stateHistory).values({
      recordType: kind.recordType,
      recordId: req.id,
      event: req.event,
      fromState: String(before.status),
      toState: plan.nextState,
      userId: req.actor.id,
      comment: reason,
      at,
    });
    await writeAudit(tx, {
      actor: { id: req.actor.id, name: req.actor.name },
      recordType: kind.recordType,
      recordId: req.id,
      action: req.event,
      changes: diffFields(before, after, ['status', ...kind.auditFields]),
      reason,
    });
    const meaning = plan.rules.signature as SignatureMeaning | null;
    const signature =
      meaning && signer
        ? await sign(tx, signer, {
            recordType: kind.recordType,
            recordId: req.id,
            recordVersion: version,
            content: signedContentOf(kind, meaning, after, relatedAfter)!,
            meaning,
            reason,
          })
        : null;
    const base = { actor: req.actor, recordType: kind.recordType, event: req.event, before, after };
    await runInTransaction(tx, kind, plan.effects, base);
    return { after, relatedAfter, signature, effects: plan.effects, base };
  });

  await runAfterCommit(kind, done.effects, done.base);
  return {
    record: kind.toDto(done.after) as DtoOf<K>,
    ...abilitiesOf(kind, req.actor, done.after, done.relatedAfter),
    signature: done.signature,
  };
}

// ── Section edits ────────────────────────────────────────────────────────────────────────────────

export interface EditResult<K extends AnyRecordKind, T> {
  /** Column changes to the record row. */
  changes?: Partial<InsertOf<K>>;
  /** Audit changes beyond the record's own columns (child rows, links, files), named as they read. */
  audit?: FieldChange[];
  /** What the command hands back besides the record (a disposition, the CAPA it opened). */
  result?: T;
  /** Follow-ups for once the edit has committed (a CAPA's own after-commit effects). */
  afterCommit?: () => Promise<void>;
}

export interface EditRequest<K extends AnyRecordKind, T> {
  id: number;
  section: SectionOf<K>;
  actor: RecordActor;
  /** The version the person saw; null when a child row carries its own (an action, a file). */
  expectedVersion: number | null;
  /** The audit entry's action, e.g. "record_triage". */
  action: string;
  reason?: string | null;
  /** What the section's rules need to know of this edit (e.g. which action). */
  params?: unknown;
  /** Said when someone else saved first; the default says nothing was overwritten. */
  conflictMessage?: string;
  /**
   * The edit itself, on the locked row after every check: validates (ValidationError writes
   * nothing), writes child rows through `tx`, and says which columns change.
   */
  apply: (row: RowOf<K>, at: { tx: Tx; now: Date; related: Related<K> }) => Promise<EditResult<K, T>> | EditResult<K, T>;
}

export interface EditOutcome<K extends AnyRecordKind, T> extends WriteOutcome<K> {
  row: RowOf<K>;
  result: T | undefined;
}

export async function editRecord<K extends AnyRecordKind, T = undefined>(kind: K, req: EditRequest<K, T>): Promise<EditOutcome<K, T>> {
  const section = (kind.sections as Record<string, { bumpsVersion?: boolean }> | undefined)?.[req.section];
  if (!section) throw new Error(`${kind.recordType} has no section "${req.section}"`);
  const bumps = section.bumpsVersion !== false;
  const reason = req.reason?.trim() || null;

  const done = await writeTransaction(async (tx) => {
    const before = await getVisibleRow(tx, kind, req.id, req.actor, { lock: true });
    const related = await loadRelated(kind, tx, before);
    const check = checkSection(kind, req.actor, before, related, req.section, req.params);
    const stale = req.expectedVersion !== null && Number(before.version) !== req.expectedVersion;
    if (!check.ok) throw stale && check.status === 409 ? new ConflictError(req.conflictMessage) : refusalError(check);
    if (stale) throw new ConflictError(req.conflictMessage);

    const at = now();
    const edit = await req.apply(before, { tx, now: at, related });
    const changes = (edit.changes ?? {}) as Record<string, unknown>;
    let after = before;
    if (bumps || Object.keys(changes).length > 0) {
      const table = kind.table;
      const [result] = await tx
        .update(table as MySqlTable)
        .set({ ...changes, ...(bumps ? { version: Number(before.version) + 1 } : {}) })
        .where(and(eq(table.id, req.id), eq(table.version, before.version)));
      if (result.affectedRows !== 1) throw new ConflictError(req.conflictMessage);
      after = (await readRow(tx, kind, req.id, false))!;
    }
    await writeAudit(tx, {
      actor: { id: req.actor.id, name: req.actor.name },
      recordType: kind.recordType,
      recordId: req.id,
      action: req.action,
      changes: [...diffFields(before, after, kind.auditFields), ...(edit.audit ?? [])],
      reason,
    });
    const relatedAfter = after === before && !edit.audit?.length ? related : await loadRelated(kind, tx, after);
    return { after, relatedAfter, edit };
  });

  await done.edit.afterCommit?.();
  return {
    record: kind.toDto(done.after) as DtoOf<K>,
    row: done.after,
    result: done.edit.result,
    ...abilitiesOf(kind, req.actor, done.after, done.relatedAfter),
    signature: null,
  };
}

export { lockRowsInOrder, writeConsequence } from './rows';

// ── New records ──────────────────────────────────────────────────────────────────────────────────

export interface CreateRequest<K extends AnyRecordKind> {
  actor: RecordActor;
  /** The permission creating this kind needs, e.g. 'deviation.raise'. */
  permission: Permission;
  /** Column values; status and version come from the machine and the path, number from `number`. */
  values: { [P in keyof InsertOf<K> as P extends 'id' | 'status' | 'version' | 'number' ? never : P]: InsertOf<K>[P] };
  /** Allocate a human number into the `number` column; the year defaults to the current UTC year. */
  number?: { type: NumberedRecordType; year?: number };
  reason?: string | null;
  /** The audit entry's action; "create" by default. */
  action?: string;
  /** Audit changes beyond the columns (child rows the caller writes with the record). */
  audit?: FieldChange[];
  /** Child rows written with the record, once its id is known (levels of a scale version, held batches). */
  children?: (tx: Tx, row: RowOf<K>) => Promise<FieldChange[] | void>;
}

/**
 * Inserts a new record inside the caller's transaction (which must come from writeTransaction, or
 * be the one createRecord opens): number, row, history and audit entry. Returns the row and the
 * follow-ups to run once the caller has committed.
 */
export async function insertRecord<K extends AnyRecordKind>(
  tx: Tx,
  kind: K,
  req: CreateRequest<K>,
): Promise<{ row: RowOf<K>; afterCommit: () => Promise<void> }> {
  assertCan(req.actor, req.permission);
  const machine = kind.machine as AnyStateMachine | undefined;
  const [initial, actions] = machine ? initialTransition(machine) : [null, []];
  if (initial && typeof initial.value !== 'string') throw new Error(`workflow ${machine!.id} is not flat`);
  const status = initial ? (initial.value as string) : null;

  const values: Record<string, unknown> = { ...req.values, version: 1, ...(status ? { status } : {}) };
  if (req.number) {
    if (!('number' in kind.table)) throw new Error(`${kind.recordType} has no number column`);
    values.number = await allocateNumber(tx, req.number.type, req.number.year ?? now().getUTCFullYear());
  }
  const [inserted] = await tx
    .insert(kind.table as MySqlTable)
    .values(values)
    .$returningId();
  const id = Number((inserted as { id: number }).id);
  const row = (await readRow(tx, kind, id, false))!;
  const childChanges = (await req.children?.(tx, row)) ?? [];
  const reason = req.reason?.trim() || null;

  if (status) {
    await tx.insert(stateHistory).values({
      recordType: kind.recordType,
      recordId: id,
      event: 'create',
      fromState: null,
      toState: status,
      userId: req.actor.id,
      comment: reason,
      at: now(),
    });
  }
  const auditFields = [...(req.number ? ['number'] : []), ...(status ? ['status'] : []), ...kind.auditFields];
  await writeAudit(tx, {
    actor: { id: req.actor.id, name: req.actor.name },
    recordType: kind.recordType,
    recordId: id,
    action: req.action ?? 'create',
    changes: [...diffFields(null, row, auditFields), ...(req.audit ?? []), ...childChanges],
    reason,
  });
  const effects = actions.filter((a) => !a.type.startsWith('xstate.')).map((a) => ({ type: a.type, params: a.params }));
  const base = { actor: req.actor, recordType: kind.recordType, event: 'create', before: null, after: row };
  await runInTransaction(tx, kind, effects, base);
  return { row, afterCommit: () => runAfterCommit(kind, effects, base) };
}

/**
 * Creates a record in a transaction of its own. `build` runs in it first and says what to insert
 * (it may look things up, and refuse with a ValidationError).
 */
export async function createRecord<K extends AnyRecordKind>(
  kind: K,
  actor: RecordActor,
  permission: Permission,
  build: Omit<CreateRequest<K>, 'actor' | 'permission'> | ((tx: Tx) => Promise<Omit<CreateRequest<K>, 'actor' | 'permission'>>),
): Promise<WriteOutcome<K> & { row: RowOf<K> }> {
  // The role first: a person who may not create this is told so before anything about their input.
  assertCan(actor, permission);
  const { row, related, afterCommit } = await writeTransaction(async (tx) => {
    const request = typeof build === 'function' ? await build(tx) : build;
    const created = await insertRecord(tx, kind, { ...request, actor, permission } as CreateRequest<K>);
    return { ...created, related: await loadRelated(kind, tx, created.row) };
  });
  await afterCommit();
  return { record: kind.toDto(row) as DtoOf<K>, row, ...abilitiesOf(kind, actor, row, related), signature: null };
}
