import {
  type AnyMachineSnapshot,
  type AnyStateMachine,
  type AnyTransitionDefinition,
  getNextTransitions,
  transition,
} from 'xstate';
import { isSignatureMeaning, type SignatureMeaning } from '../signatures/meanings';

/*
 * Questions the write path asks a record's workflow machine, answered purely: which state a stored
 * status is, whether an event may be sent, what it asks of the sender (reason, signature) and where
 * it leads. Record machines are flat: the state value is the database enum value.
 */

export interface WorkflowActor {
  id: number;
  role: string;
}

/** What a transition asks of the person sending the event, read from the transition's `meta`. */
export interface TransitionRules {
  reasonRequired: boolean;
  signature: SignatureMeaning | null;
}

export interface EffectRequest {
  type: string;
  params: unknown;
}

export type EventPlan =
  | {
      ok: true;
      rules: TransitionRules;
      nextState: string;
      nextContext: Record<string, unknown>;
      /** Named actions the machine asked for; the record kind's effects perform them. */
      effects: EffectRequest[];
    }
  | { ok: false; problem: 'not_in_this_state' }
  | { ok: false; problem: 'refused'; guard: string | null };

export function stateKeysOf(machine: AnyStateMachine): string[] {
  return Object.keys(machine.states);
}

/** Event types the machine knows, without XState's internal ones. */
export function eventTypesOf(machine: AnyStateMachine): string[] {
  return (machine.events as string[]).filter((e) => !e.startsWith('xstate.') && e !== '*');
}

export function resolveSnapshot(
  machine: AnyStateMachine,
  state: string,
  context: Record<string, unknown> = {},
): AnyMachineSnapshot {
  if (!stateKeysOf(machine).includes(state)) {
    throw new Error(`stored status "${state}" is not a state of workflow ${machine.id}`);
  }
  return machine.resolveState({ value: state, context });
}

export function rulesFromMeta(meta: unknown): TransitionRules {
  const m = (meta ?? {}) as { reason?: unknown; signature?: unknown };
  if (m.signature !== undefined && !isSignatureMeaning(m.signature)) {
    throw new Error(`transition meta names an unknown signature meaning: ${String(m.signature)}`);
  }
  return { reasonRequired: m.reason === 'required', signature: m.signature ?? null };
}

function guardName(t: AnyTransitionDefinition): string | null {
  const g = t.guard as unknown;
  if (typeof g === 'string') return g;
  if (g && typeof g === 'object' && 'type' in g && typeof g.type === 'string') return g.type;
  return null;
}

export function planEvent(
  machine: AnyStateMachine,
  snapshot: AnyMachineSnapshot,
  event: { type: string; actor: WorkflowActor },
): EventPlan {
  const candidates = getNextTransitions(snapshot).filter((t) => t.eventType === event.type);
  if (candidates.length === 0) return { ok: false, problem: 'not_in_this_state' };
  const enabled = machine.getTransitionData(snapshot, event);
  const taken = enabled[0];
  if (!taken) {
    return { ok: false, problem: 'refused', guard: candidates.map(guardName).find((g) => g !== null) ?? null };
  }
  const [next, actions] = transition(machine, snapshot, event);
  if (typeof next.value !== 'string') throw new Error(`workflow ${machine.id} is not flat`);
  return {
    ok: true,
    rules: rulesFromMeta(taken.meta),
    nextState: next.value,
    nextContext: next.context as Record<string, unknown>,
    effects: actions
      .filter((a) => !a.type.startsWith('xstate.'))
      .map((a) => ({ type: a.type, params: a.params })),
  };
}

export interface AllowedEvent<E extends string = string> extends TransitionRules {
  type: E;
}

/**
 * Events this actor may send now by the machine's guards, with what each asks of them. Callers
 * also filter by the permission table (lib/records/kind.ts does both).
 */
export function machineAllowedEvents(
  machine: AnyStateMachine,
  snapshot: AnyMachineSnapshot,
  actor: WorkflowActor,
): AllowedEvent[] {
  const out: AllowedEvent[] = [];
  for (const type of eventTypesOf(machine)) {
    const taken = machine.getTransitionData(snapshot, { type, actor })[0];
    if (taken) out.push({ type, ...rulesFromMeta(taken.meta) });
  }
  return out;
}

/** Every transition's rules and guard, for checks when a record kind is defined. */
export function allTransitions(machine: AnyStateMachine): { from: string; event: string; guard: string | null; meta: unknown }[] {
  const out: { from: string; event: string; guard: string | null; meta: unknown }[] = [];
  for (const [from, node] of Object.entries(machine.states)) {
    for (const list of node.transitions.values()) {
      for (const t of list) out.push({ from, event: t.eventType, guard: guardName(t), meta: t.meta });
    }
  }
  return out;
}
