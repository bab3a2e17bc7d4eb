import type { InferInsertModel, InferSelectModel } from 'drizzle-orm';
import type { AnyMySqlColumn, MySqlTable } from 'drizzle-orm/mysql-core';
import type { AnyStateMachine, ContextFrom, EventFromLogic } from 'xstate';
import type { Tx } from '../../db/client';
import { can, type Permission } from '../auth/permissions';
import type { Role } from '../auth/roles';
import type { RecordType } from './types';
import {
  type AllowedEvent,
  allTransitions,
  eventTypesOf,
  machineAllowedEvents,
  resolveSnapshot,
  rulesFromMeta,
  stateKeysOf,
} from './workflow';

/*
 * A record kind ties a table to its workflow machine and says, once, everything the write path
 * needs to know about it: which permission each event needs, whose record it is for 'own'
 * permissions, which fields are signed and audited, and how the machine's named actions are
 * performed. lib/records/write-path.ts does the rest the same way for every kind.
 */

/** A table the write path can drive: an id, a status holding the machine's state, and a version. */
export type WorkflowTable = MySqlTable & { id: AnyMySqlColumn; status: AnyMySqlColumn; version: AnyMySqlColumn };

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
  inTransaction?: (tx: Tx, ctx: EffectContext<TRow>) => Promise<void>;
  afterCommit?: (ctx: EffectContext<TRow>) => void | Promise<void>;
}

export interface RecordKindConfig<TTable extends WorkflowTable, TMachine extends AnyStateMachine, TDto> {
  recordType: RecordType;
  /** Lower-case noun for messages, e.g. "filling ring". */
  noun: string;
  table: TTable;
  machine: TMachine;
  /** Without it the record is treated as missing (NotFoundError), not as forbidden. */
  readPermission: Permission;
  eventPermissions: Record<EventFromLogic<TMachine>['type'], Permission>;
  eventLabels: Record<EventFromLogic<TMachine>['type'], string>;
  stateLabels: Record<string, string>;
  /** What a person is told when a named guard refuses them. */
  guardRefusals: Record<string, string>;
  /** Users who count as the record's own for 'own' permissions (raiser, creator, owner). */
  ownerIds?: (row: InferSelectModel<TTable>) => readonly (number | null | undefined)[];
  /** The machine context a stored row resolves to (data the guards read). */
  context: (row: InferSelectModel<TTable>) => ContextFrom<TMachine>;
  /** The GMP content a signature binds to; never volatile columns like updated_at. */
  signedContent: (row: InferSelectModel<TTable>) => Record<string, unknown>;
  /** Columns whose changes go into the audit entry (status is always included). */
  auditFields: readonly (keyof InferSelectModel<TTable> & string)[];
  toDto: (row: InferSelectModel<TTable>) => TDto;
  effects?: Record<string, Effect<InferSelectModel<TTable>>>;
}

export type RecordKind<TTable extends WorkflowTable, TMachine extends AnyStateMachine, TDto> = Readonly<
  RecordKindConfig<TTable, TMachine, TDto>
>;

/** Any kind at all; the table is `any` because Drizzle's table generics do not widen to a common type. */
export type AnyRecordKind = RecordKind<any, AnyStateMachine, any>;
export type RowOf<K extends AnyRecordKind> = InferSelectModel<K['table']>;
export type InsertOf<K extends AnyRecordKind> = InferInsertModel<K['table']>;
export type DtoOf<K extends AnyRecordKind> = ReturnType<K['toDto']>;
export type EventOf<K extends AnyRecordKind> = EventFromLogic<K['machine']>['type'] & string;

/**
 * Checks the kind against its machine when the module loads, so a missing permission, label,
 * refusal message or effect fails at once rather than on the day someone sends that event.
 */
export function defineRecordKind<TTable extends WorkflowTable, TMachine extends AnyStateMachine, TDto>(
  config: RecordKindConfig<TTable, TMachine, TDto>,
): RecordKind<TTable, TMachine, TDto> {
  const problems: string[] = [];
  const events = eventTypesOf(config.machine);
  for (const e of events) {
    if (!(e in config.eventPermissions)) problems.push(`event "${e}" has no permission`);
    if (!(e in config.eventLabels)) problems.push(`event "${e}" has no label`);
  }
  for (const s of stateKeysOf(config.machine)) {
    if (!(s in config.stateLabels)) problems.push(`state "${s}" has no label`);
  }
  for (const t of allTransitions(config.machine)) {
    try {
      rulesFromMeta(t.meta);
    } catch (err) {
      problems.push(`${t.from} --${t.event}: ${(err as Error).message}`);
    }
    if (t.guard && !(t.guard in config.guardRefusals)) problems.push(`guard "${t.guard}" has no refusal message`);
  }
  const implemented = Object.keys(config.machine.implementations.actions ?? {});
  for (const action of implemented) {
    if (!config.effects?.[action]) problems.push(`action "${action}" has no effect in lib`);
  }
  if (problems.length > 0) {
    throw new Error(`record kind ${config.recordType} does not fit its workflow:\n  ${problems.join('\n  ')}`);
  }
  return Object.freeze(config);
}

export function ownerScope<K extends AnyRecordKind>(kind: K, row: RowOf<K>) {
  return { ownerIds: kind.ownerIds ? kind.ownerIds(row) : [] };
}

export function stateLabel(kind: AnyRecordKind, state: string): string {
  return kind.stateLabels[state] ?? state.replace(/_/g, ' ');
}

export function eventLabel(kind: AnyRecordKind, event: string): string {
  return (kind.eventLabels as Record<string, string>)[event] ?? event.replace(/_/g, ' ');
}

/**
 * The events this actor may send to this record now: allowed by the permission table (role and
 * 'own' scope) and by the machine's guards, with the reason and signature each one asks for.
 */
export function allowedEventsFor<K extends AnyRecordKind>(
  kind: K,
  actor: RecordActor,
  row: RowOf<K>,
): AllowedEvent<EventOf<K>>[] {
  const scope = ownerScope(kind, row);
  if (!can(actor, kind.readPermission, scope)) return [];
  const snapshot = resolveSnapshot(kind.machine, String(row.status), kind.context(row));
  const permissions = kind.eventPermissions as Record<string, Permission>;
  return machineAllowedEvents(kind.machine, snapshot, actor).filter((e) => {
    const permission = permissions[e.type];
    return permission !== undefined && can(actor, permission, scope);
  }) as AllowedEvent<EventOf<K>>[];
}
