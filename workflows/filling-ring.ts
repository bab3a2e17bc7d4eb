/*
 * Filling ring lifecycle. A ring is in service on its machine until someone on the floor or in QA
 * finds something wrong with it (a dent, a burr on the bores, a cracked segment) and quarantines it,
 * saying why. A quarantined ring goes back into service only when a QA investigator or approver has
 * inspected it and signs that it is fit ("verified"); otherwise a QA approver retires it with an
 * "approved" signature. Retirement is final: a retired ring never returns to a machine. Whoever took
 * the ring out of service does not also judge it fit or retire it (segregation of duties, declared by
 * lib/equipment/ring-kind.ts).
 *
 * Guards read only the actor and the context, never the event's payload, so the write path can ask
 * which events a person may send without knowing what they will type. Each transition's `meta`
 * says what it asks of that person: a reason, a signature and its meaning. Actions only name an
 * effect; lib/equipment performs it (telling QA that a ring has been taken out of service).
 */
import { setup } from 'xstate';
import type { RingState } from './states';

export interface RingActor {
  id: number;
  role: string;
}

export const ringEvents = ['quarantine', 'return_to_service', 'retire'] as const;
export type RingEventType = (typeof ringEvents)[number];
export type RingEvent = { type: RingEventType; actor: RingActor };

export interface RingTransitionRules {
  reason?: 'required';
  signature?: 'verified' | 'approved';
}

const floorAndQa: readonly string[] = ['operator', 'supervisor', 'qa_investigator', 'qa_approver'];
const qaReviewers: readonly string[] = ['qa_investigator', 'qa_approver'];

export const fillingRingMachine = setup({
  types: {
    context: {} as Record<string, never>,
    events: {} as RingEvent,
    transitionMeta: {} as RingTransitionRules,
  },
  guards: {
    byFloorOrQa: ({ event }) => floorAndQa.includes(event.actor.role),
    byQaInvestigatorOrApprover: ({ event }) => qaReviewers.includes(event.actor.role),
    byQaApprover: ({ event }) => event.actor.role === 'qa_approver',
  },
  actions: {
    // Named here, performed by the write path inside the transaction (an outbox row per QA reader).
    notifyQaOfQuarantine: () => {},
  },
}).createMachine({
  id: 'filling_ring',
  initial: 'in_service' satisfies RingState,
  context: {},
  states: {
    in_service: {
      on: {
        quarantine: {
          target: 'quarantined',
          guard: 'byFloorOrQa',
          actions: 'notifyQaOfQuarantine',
          meta: { reason: 'required' },
        },
      },
    },
    quarantined: {
      on: {
        return_to_service: {
          target: 'in_service',
          guard: 'byQaInvestigatorOrApprover',
          meta: { reason: 'required', signature: 'verified' },
        },
        retire: { target: 'retired', guard: 'byQaApprover', meta: { reason: 'required', signature: 'approved' } },
      },
    },
    retired: { type: 'final' },
  },
});

/** What a person is told when a guard turns them away. */
export const ringGuardRefusals: Record<keyof typeof fillingRingMachine.implementations.guards, string> = {
  byFloorOrQa: 'Only operators, supervisors and QA may quarantine a filling ring.',
  byQaInvestigatorOrApprover: 'Only a QA investigator or QA approver may return a ring to service.',
  byQaApprover: 'Only a QA approver may retire a filling ring.',
};
