import { type InferInsertModel, type InferSelectModel, type SQL, eq, getTableColumns, or, sql } from 'drizzle-orm';
import type { AnyMySqlColumn, MySqlTable } from 'drizzle-orm/mysql-core';
import type { AnyStateMachine, ContextFrom, EventFromLogic } from 'xstate';
import type { DbOrTx, Tx } from '../../db/client';
import { type Actor, can, permissionTable, type Permission } from '../auth/permissions';
import type { Role } from '../auth/roles';
import type { SignatureMeaning } from '../signatures/meanings';
import type { RecordType } from './types';
import {
  type AllowedEvent,
  type EventPlan,
  allTransitions,
  eventTypesOf,
  planEvent,
  resolveSnapshot,
  rulesFromMeta,
  stateKeysOf,
} from './workflow';

/*
 * A record kind says, once, every rule about one kind of record, and nothing else in the product
 * restates them: who sees a record (and the same rule as SQL for lists), who may change which
 * section in which state, who may send which lifecycle event, who may not because of what they did
 * on the record (segregation of duties), what each signature meaning covers, which fields the audit
 * trail records, and how the machine's named actions are performed. lib/records/write-path.ts
 * enforces them the same way for every kind, and the DTO a page gets says what this person may do
 * now and why not, from the same rules.
 *
 * Kinds with a lifecycle give a machine (workflows/); plain kinds (users, closures, scale versions)
 * have none and are edited section by section.
 */

/** A table the write path can drive: an id and a version (optimistic locking). */
export type RecordTable = MySqlTable & { id: AnyMySqlColumn; version: AnyMySqlColumn };
/** A record table with a lifecycle: its status column holds the machine's state. */
export type WorkflowTable = RecordTable & { status: AnyMySqlColumn };

/** Who is acting. CurrentUser (lib/auth/session.ts) fits. */
export interface RecordActor {
  id: number;
  name: string;
  role: Role;
}

export interface EffectContext<TRow> {
  actor: RecordActor;
  recordType: RecordType;
  event: string;
  before: TRow | null;
  after: TRow;
  params: unknown;
}

/**
 * How lib/ performs one named machine action. Work that must commit with the change (outbox rows)
 * goes in `inTransaction`; work that only makes sense once it has committed (waking a worker) goes
 * in `afterCommit`, whose failures are logged and do not undo the change.
 */
export interface Effect<TRow> {
  inTransaction?(tx: Tx, ctx: EffectContext<TRow>): Promise<void>;
  afterCommit?(ctx: EffectContext<TRow>): void | Promise<void>;
}

type UserIds = readonly (number | null | undefined)[];

/*
 * Functions of a row, checked bivariantly (as methods are) so a kind over one table still counts as
 * AnyRecordKind; each kind's own functions are fully typed where it is defined.
 */
type Fn<A extends unknown[], R> = { bivarianceHack(...args: A): R }['bivarianceHack'];

/** A way a person can be tied to a record, for segregation of duties. */
export interface Participation<TRow, TRelated> {
  /** What they did, after "you": "raised this deviation", "completed one of its actions". */
  did: string;
  of: Fn<[row: TRow, related: TRelated], UserIds>;
}

/** A part of a record that is edited on its own (the draft, the triage, the plan, the letter ...). */
export interface SectionRule<TRow, TRelated, TParticipant extends string> {
  /** What editing it is called, for messages and the page: "Recording the triage". */
  label: string;
  permission: Permission;
  /** The states in which it may be edited. */
  states: readonly string[] | 'any';
  /** What a person is told in any other state, when the generic "possible only while …" would not help. */
  stateRefusal?: string | Fn<[row: TRow], string>;
  /**
   * The only people who may edit it, whatever their role's scope (the assigned investigator, the
   * CAPA owner). `params` are what the command names (e.g. which action).
   */
  holders?: { of: Fn<[row: TRow, related: TRelated, params: unknown], UserIds>; refusal: string };
  /**
   * Who counts as "own" for an 'own'-scoped permission here, instead of the kind's owners (the
   * action's owner completes it; action owners add their evidence); roles with 'any' scope are not
   * limited by it.
   */
  ownScope?: { of: Fn<[row: TRow, related: TRelated, params: unknown], UserIds>; refusal: string };
  /** Segregation of duties: who may not edit it because of what they did on the record. */
  independentOf?: readonly TParticipant[];
  /** A condition on the record's data beyond its state ("at triage, only a minor deviation"). */
  condition?: { holds: Fn<[row: TRow, related: TRelated, params: unknown], boolean>; refusal: string | Fn<[row: TRow], string> };
  /** False for a note that changes nothing the version guards (a comment, a request to approve). */
  bumpsVersion?: boolean;
}

type EventsOf<TMachine> = TMachine extends AnyStateMachine ? EventFromLogic<TMachine>['type'] & string : never;

export interface RecordKindConfig<
  TTable extends RecordTable,
  TMachine extends AnyStateMachine | undefined,
  TDto,
  TRelated,
  TParticipant extends string,
  TSection extends string,
> {
  recordType: RecordType;
  /** Lower-case noun for messages, e.g. "filling ring". */
  noun: string;
  table: TTable;
  machine?: TMachine;
  /** Without it the record is treated as missing (NotFoundError), not as forbidden. */
  readPermission: Permission;
  /** Columns naming the people whose record it is, for 'own' permissions (raiser, creator, owner). */
  owners?: Fn<[table: TTable], AnyMySqlColumn[]>;
  /** Beyond the read permission, e.g. a draft is its author's until submitted. Pure. */
  visibleTo?: Fn<[actor: Actor, row: InferSelectModel<TTable>], boolean>;
  /** visibleTo as SQL, for lists; tests/integration/records/visibility.test.ts keeps the two equal. */
  visibleWhere?: (actor: Actor) => SQL | undefined;
  /** Child rows and facts the rules need (held batches, actions, who signed), read under the row lock. */
  related?: Fn<[dbOrTx: DbOrTx, row: InferSelectModel<TTable>], Promise<TRelated>>;
  /** The machine context a stored row and its related facts resolve to (what the guards read). */
  context?: Fn<[row: InferSelectModel<TTable>, related: TRelated], TMachine extends AnyStateMachine ? ContextFrom<TMachine> : never>;
  /** For a plain kind, the state its sections are edited in (e.g. active / inactive). */
  stateOf?: Fn<[row: InferSelectModel<TTable>], string>;
  eventPermissions?: Record<EventsOf<TMachine>, Permission>;
  eventLabels?: Record<EventsOf<TMachine>, string>;
  stateLabels: Record<string, string>;
  /**
   * What a person is told when a named guard refuses them: a sentence, or one built from the record
   * ("BW-2611-03 has no disposition yet") when the guard checks several things.
   */
  guardRefusals?: Record<string, string | Fn<[row: InferSelectModel<TTable>, related: TRelated], string | null | undefined>>;
  /** The ways a person can be tied to a record. */
  participants?: Record<TParticipant, Participation<InferSelectModel<TTable>, TRelated>>;
  /** Segregation of duties per event: who may not send it. */
  independence?: Partial<Record<EventsOf<TMachine>, readonly TParticipant[]>>;
  sections?: Record<TSection, SectionRule<InferSelectModel<TTable>, TRelated, TParticipant>>;
  /**
   * What a signature of each meaning covers: an object whose top-level keys are parts (the facts,
   * the investigation, the actions, the evidence) named in signedPartLabels. Never volatile columns
   * such as updated_at.
   */
  signedContent?: Partial<Record<SignatureMeaning, Fn<[row: InferSelectModel<TTable>, related: TRelated], Record<string, unknown>>>>;
  signedPartLabels?: Record<string, string>;
  /** Columns whose changes go into the audit entry (status is always included). */
  auditFields: readonly (keyof InferSelectModel<TTable> & string)[];
  toDto: Fn<[row: InferSelectModel<TTable>], TDto>;
  effects?: Record<string, Effect<InferSelectModel<TTable>>>;
}

export type RecordKind<
  TTable extends RecordTable,
  TMachine extends AnyStateMachine | undefined,
  TDto,
  TRelated,
  TParticipant extends string,
  TSection extends string,
> = Readonly<RecordKindConfig<TTable, TMachine, TDto, TRelated, TParticipant, TSection>>;

/** Any kind at all; the table is `any` because Drizzle's table generics do not widen to a common type. */
export type AnyRecordKind = RecordKind<any, any, any, any, string, string>;
export type RowOf<K extends AnyRecordKind> = InferSelectModel<K['table']>;
export type InsertOf<K extends AnyRecordKind> = InferInsertModel<K['table']>;
export type DtoOf<K extends AnyRecordKind> = ReturnType<K['toDto']>;
export type RelatedOf<K extends AnyRecordKind> = K extends RecordKind<any, any, any, infer R, any, any> ? R : never;
export type EventOf<K extends AnyRecordKind> = K extends RecordKind<any, infer M, any, any, any, any> ? EventsOf<M> : never;
export type SectionOf<K extends AnyRecordKind> = K extends RecordKind<any, any, any, any, any, infer S> ? S : never;

/**
 * Checks the kind against its machine when the module loads, so a missing permission, label,
 * refusal message, signed content or effect fails at once rather than on the day someone sends
 * that event.
 */
export function defineRecordKind<
  TTable extends RecordTable,
  TMachine extends AnyStateMachine | undefined,
  TDto,
  TRelated = Record<string, never>,
  TParticipant extends string = never,
  TSection extends string = never,
>(
  config: RecordKindConfig<TTable, TMachine, TDto, TRelated, TParticipant, TSection>,
): RecordKind<TTable, TMachine, TDto, TRelated, TParticipant, TSection> {
  const problems: string[] = [];
  const machine = config.machine as AnyStateMachine | undefined;
  const participants = (config.participants ?? {}) as Record<string, unknown>;
  if (machine) {
    const permissions = (config.eventPermissions ?? {}) as Record<string, unknown>;
    const labels = (config.eventLabels ?? {}) as Record<string, unknown>;
    for (const e of eventTypesOf(machine)) {
      if (!(e in permissions)) problems.push(`event "${e}" has no permission`);
      if (!(e in labels)) problems.push(`event "${e}" has no label`);
    }
    for (const s of stateKeysOf(machine)) {
      if (!(s in config.stateLabels)) problems.push(`state "${s}" has no label`);
    }
    for (const t of allTransitions(machine)) {
      try {
        const rules = rulesFromMeta(t.meta);
        if (rules.signature && !config.signedContent?.[rules.signature]) {
          problems.push(`${t.from} --${t.event}: no signed content for meaning "${rules.signature}"`);
        }
      } catch (err) {
        problems.push(`${t.from} --${t.event}: ${(err as Error).message}`);
      }
      if (t.guard && !(t.guard in (config.guardRefusals ?? {}))) problems.push(`guard "${t.guard}" has no refusal message`);
    }
    const implemented = Object.keys(machine.implementations.actions ?? {});
    for (const action of implemented) {
      if (!config.effects?.[action]) problems.push(`action "${action}" has no effect in lib`);
    }
    if (!config.context) problems.push('a kind with a machine needs a context');
  } else if (!config.stateOf) {
    problems.push('a plain kind needs stateOf');
  }
  for (const [event, who] of Object.entries(config.independence ?? {}) as [string, readonly string[]][]) {
    if (machine && !eventTypesOf(machine).includes(event)) problems.push(`independence names unknown event "${event}"`);
    for (const p of who) if (!(p in participants)) problems.push(`independence of "${event}" names unknown participant "${p}"`);
  }
  for (const [name, section] of Object.entries(config.sections ?? {}) as [string, SectionRule<unknown, unknown, string>][]) {
    for (const p of section.independentOf ?? []) {
      if (!(p in participants)) problems.push(`section "${name}" names unknown participant "${p}"`);
    }
    if (section.states !== 'any') {
      for (const s of section.states) if (!(s in config.stateLabels)) problems.push(`section "${name}" names unknown state "${s}"`);
    }
  }
  if (problems.length > 0) {
    throw new Error(`record kind ${config.recordType} does not fit its rules:\n  ${problems.join('\n  ')}`);
  }
  return Object.freeze(config);
}

// ── Who the record belongs to, and who sees it ──────────────────────────────────────────────────

const ownerKeysCache = new WeakMap<object, string[]>();

/** The row properties of the kind's owner columns. */
function ownerKeys(kind: AnyRecordKind): string[] {
  const cached = ownerKeysCache.get(kind);
  if (cached) return cached;
  const wanted = kind.owners ? kind.owners(kind.table) : [];
  const keys = Object.entries(getTableColumns(kind.table as MySqlTable))
    .filter(([, column]) => wanted.includes(column as AnyMySqlColumn))
    .map(([key]) => key);
  ownerKeysCache.set(kind, keys);
  return keys;
}

export function ownerIdsOf<K extends AnyRecordKind>(kind: K, row: RowOf<K>): (number | null)[] {
  return ownerKeys(kind).map((k) => ((row as Record<string, unknown>)[k] as number | null) ?? null);
}

/** Whether this person may see this record at all. Everything else is asked only when this holds. */
export function isVisibleTo<K extends AnyRecordKind>(kind: K, actor: Actor, row: RowOf<K>): boolean {
  if (!can(actor, kind.readPermission, { ownerIds: ownerIdsOf(kind, row) })) return false;
  return kind.visibleTo ? kind.visibleTo(actor, row) : true;
}

/** isVisibleTo as SQL over the kind's table, for lists. */
export function visibleWhere(kind: AnyRecordKind, actor: Actor): SQL | undefined {
  const scope = permissionTable[kind.readPermission][actor.role];
  const extra = kind.visibleWhere?.(actor);
  if (!scope) return sql`1 = 0`;
  if (scope === 'any') return extra;
  const columns = kind.owners ? kind.owners(kind.table) : [];
  const own = columns.length === 0 ? sql`1 = 0` : or(...columns.map((c) => eq(c, actor.id)));
  return extra ? sql`(${own}) and (${extra})` : own;
}

// ── The rules, asked of one record ───────────────────────────────────────────────────────────────

export function stateOf<K extends AnyRecordKind>(kind: K, row: RowOf<K>): string {
  return kind.stateOf ? kind.stateOf(row) : String((row as { status: unknown }).status);
}

export function stateLabel(kind: AnyRecordKind, state: string): string {
  return kind.stateLabels[state] ?? state.replace(/_/g, ' ');
}

export function eventLabel(kind: AnyRecordKind, event: string): string {
  return (kind.eventLabels as Record<string, string> | undefined)?.[event] ?? event.replace(/_/g, ' ');
}

/** Why a person may not do this themselves: the things they did on the record that the rule excludes. */
export function conflictOfInterest<K extends AnyRecordKind>(
  kind: K,
  actor: Actor,
  row: RowOf<K>,
  related: RelatedOf<K>,
  excluded: readonly string[] | undefined,
  what: string,
): string | null {
  if (!excluded || excluded.length === 0) return null;
  const participants = (kind.participants ?? {}) as Record<string, Participation<RowOf<K>, RelatedOf<K>>>;
  const did = excluded.filter((p) => participants[p]?.of(row, related).includes(actor.id)).map((p) => participants[p]!.did);
  if (did.length === 0) return null;
  return `“${what}” is for another person: you ${did.join(' and ')} (segregation of duties).`;
}

/** Of these people, those whom the event's segregation-of-duties rule lets send it (whom to ask to approve). */
export function independentPeople<K extends AnyRecordKind, P extends { id: number }>(
  kind: K,
  row: RowOf<K>,
  related: RelatedOf<K>,
  event: EventOf<K>,
  people: readonly P[],
): P[] {
  const excluded = (kind.independence as Record<string, readonly string[]> | undefined)?.[event] ?? [];
  const participants = (kind.participants ?? {}) as Record<string, Participation<RowOf<K>, RelatedOf<K>>>;
  const tied = new Set(excluded.flatMap((p) => participants[p]?.of(row, related) ?? []));
  return people.filter((p) => !tied.has(p.id));
}

export type EventCheck =
  | { ok: true; plan: Extract<EventPlan, { ok: true }> }
  | { ok: false; status: 403 | 409; reason: string; scope: 'role' | 'record' | 'state' };

/**
 * Whether this person may send this event to this visible record now, asked in the order a person
 * wants to hear the answer: their role does not do this (403); the record's state does not take it
 * (409); the record is not theirs (an 'own' permission) or what they did on it rules them out
 * (segregation of duties), 403; the record is not ready (a guard), 409.
 */
export function checkEvent<K extends AnyRecordKind>(
  kind: K,
  actor: Actor,
  row: RowOf<K>,
  related: RelatedOf<K>,
  event: string,
): EventCheck {
  const machine = kind.machine as AnyStateMachine | undefined;
  const permission = (kind.eventPermissions as Record<string, Permission> | undefined)?.[event];
  if (!machine || !permission) return { ok: false, status: 409, reason: `"${event}" is not an action on a ${kind.noun}.`, scope: 'state' };
  if (!permissionTable[permission][actor.role]) {
    return { ok: false, status: 403, scope: 'role', reason: `Your role does not allow this (${describePermission(permission)}).` };
  }
  const state = stateOf(kind, row);
  const snapshot = resolveSnapshot(machine, state, kind.context!(row, related) as Record<string, unknown>);
  const plan = planEvent(machine, snapshot, { type: event, actor: { id: actor.id, role: actor.role } });
  if (!plan.ok && plan.problem === 'not_in_this_state') {
    return {
      ok: false,
      status: 409,
      scope: 'state',
      reason: `"${eventLabel(kind, event)}" is not possible while this ${kind.noun} is ${stateLabel(kind, state).toLowerCase()}.`,
    };
  }
  if (!can(actor, permission, { ownerIds: ownerIdsOf(kind, row) })) {
    return { ok: false, status: 403, scope: 'record', reason: `Your role allows this only on your own records (${describePermission(permission)}).` };
  }
  const conflict = conflictOfInterest(kind, actor, row, related, (kind.independence as Record<string, readonly string[]> | undefined)?.[event], eventLabel(kind, event));
  if (conflict) return { ok: false, status: 403, reason: conflict, scope: 'record' };
  if (plan.ok) return { ok: true, plan };
  const refusal = plan.guard ? kind.guardRefusals?.[plan.guard] : undefined;
  return {
    ok: false,
    status: 409,
    scope: 'record',
    reason: (typeof refusal === 'function' ? refusal(row, related) : refusal) || `You may not ${eventLabel(kind, event).toLowerCase()} this ${kind.noun}.`,
  };
}

export type SectionCheck = { ok: true } | { ok: false; status: 403 | 409; reason: string; scope: 'role' | 'record' | 'state' };

/**
 * Whether this person may edit this section of this visible record now, in the same order as
 * checkEvent: role (403), state (409), whose it is and segregation of duties (403), the record's
 * data (409).
 */
export function checkSection<K extends AnyRecordKind>(
  kind: K,
  actor: Actor,
  row: RowOf<K>,
  related: RelatedOf<K>,
  sectionName: string,
  params: unknown = undefined,
): SectionCheck {
  const section = (kind.sections as Record<string, SectionRule<RowOf<K>, RelatedOf<K>, string>> | undefined)?.[sectionName];
  if (!section) throw new Error(`${kind.recordType} has no section "${sectionName}"`);
  if (!permissionTable[section.permission][actor.role]) {
    return { ok: false, status: 403, scope: 'role', reason: `Your role does not allow this (${describePermission(section.permission)}).` };
  }
  const state = stateOf(kind, row);
  if (section.states !== 'any' && !section.states.includes(state)) {
    if (section.stateRefusal) {
      const reason = typeof section.stateRefusal === 'function' ? section.stateRefusal(row) : section.stateRefusal;
      return { ok: false, status: 409, scope: 'state', reason };
    }
    // "Editing the plan is possible only at “Planning”; this CAPA is at “Effectiveness check” now."
    const where = section.states.map((s) => `“${stateLabel(kind, s)}”`).join(' or ');
    return {
      ok: false,
      status: 409,
      scope: 'state',
      reason: `${section.label} is possible only at ${where}; this ${kind.noun} is at “${stateLabel(kind, state)}” now.`,
    };
  }
  const own = section.ownScope ? section.ownScope.of(row, related, params) : ownerIdsOf(kind, row);
  if (!can(actor, section.permission, { ownerIds: own })) {
    return {
      ok: false,
      status: 403,
      scope: 'record',
      reason: section.ownScope?.refusal ?? `Your role allows this only on your own records (${describePermission(section.permission)}).`,
    };
  }
  const holders = section.holders?.of(row, related, params);
  if (holders && section.holders && !holders.includes(actor.id)) {
    return { ok: false, status: 403, scope: 'record', reason: section.holders.refusal };
  }
  const conflict = conflictOfInterest(kind, actor, row, related, section.independentOf, section.label);
  if (conflict) return { ok: false, status: 403, scope: 'record', reason: conflict };
  if (section.condition && !section.condition.holds(row, related, params)) {
    const { refusal } = section.condition;
    return { ok: false, status: 409, scope: 'record', reason: typeof refusal === 'function' ? refusal(row) : refusal };
  }
  return { ok: true };
}

function describePermission(p: Permission): string {
  return p.replace('.', ': ').replace(/_/g, ' ');
}

/** An event this person's role may send now but that this record refuses them, and why. */
export interface BlockedEvent<E extends string = string> {
  type: E;
  reason: string;
}

export interface SectionAccess {
  editable: boolean;
  /** Why not, when this person's role edits it but this record or its state refuses them. */
  reason: string | null;
}

export interface RecordAbilities<E extends string = string, S extends string = string> {
  /** What this person may send now, with the reason and signature each asks for. */
  allowedEvents: AllowedEvent<E>[];
  /** What their role sends in this state but this record refuses them (segregation of duties, a guard). */
  blockedEvents: BlockedEvent<E>[];
  sections: Record<S, SectionAccess>;
}

/**
 * Everything this person may do to this record now, from the same checks the write path makes,
 * so a page offers only what the server accepts and says why it hides the rest.
 */
export function abilitiesOf<K extends AnyRecordKind>(
  kind: K,
  actor: Actor,
  row: RowOf<K>,
  related: RelatedOf<K>,
): RecordAbilities<EventOf<K>, SectionOf<K>> {
  const allowedEvents: AllowedEvent<EventOf<K>>[] = [];
  const blockedEvents: BlockedEvent<EventOf<K>>[] = [];
  const sections = {} as Record<SectionOf<K>, SectionAccess>;
  if (!isVisibleTo(kind, actor, row)) return { allowedEvents, blockedEvents, sections };
  const machine = kind.machine as AnyStateMachine | undefined;
  if (machine) {
    for (const event of eventTypesOf(machine)) {
      const check = checkEvent(kind, actor, row, related, event);
      if (check.ok) allowedEvents.push({ type: event as EventOf<K>, ...check.plan.rules });
      else if (check.scope === 'record') blockedEvents.push({ type: event as EventOf<K>, reason: check.reason });
    }
  }
  for (const name of Object.keys(kind.sections ?? {}) as SectionOf<K>[]) {
    const check = checkSection(kind, actor, row, related, name);
    sections[name] = check.ok ? { editable: true, reason: null } : { editable: false, reason: check.scope === 'role' ? null : check.reason };
  }
  return { allowedEvents, blockedEvents, sections };
}
