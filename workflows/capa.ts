/*
 * CAPA lifecycle. A CAPA opens as proposed, raised from a deviation, a complaint or a trend, and
 * while proposed its owner (a QA investigator) plans it: the problem, the root cause, the corrective
 * and preventive actions with their owners and due dates, and the effectiveness criteria, written
 * before anything is done so success cannot be redefined afterwards. A QA approver who does not own
 * the CAPA signs the plan "approved"; the owner then starts the implementation, and each action owner
 * records their action as done with evidence. Once every action of the plan is completed, the owner
 * or QA opens the effectiveness check (the mail worker does it as the owner when the criterion's
 * period has run). A QA approver who is not the owner signs the outcome: "effective" closes the CAPA;
 * "not effective", with the reason, sends it back to proposed, where a new round of actions is planned
 * and approved; the earlier actions stay on record. QA may cancel an open CAPA with a reason and a
 * signature. Closed and cancelled are final.
 *
 * Guards read only the actor and the context (computed from the stored row: the owner, the counts of
 * the current round's actions and whether the criteria are written), never the event's payload.
 * Each transition's `meta` says what it asks of the sender: a reason, a signature and its meaning.
 * Actions only name an effect; lib/capa performs it.
 */
import { setup } from 'xstate';
import type { CapaState } from './states';

export interface CapaActor {
  id: number;
  role: string;
}

/** What the guards know about the stored CAPA. */
export type CapaContext = {
  ownerId: number;
  /** Actions planned in the current round. */
  actionsPlanned: number;
  /** Actions of the current round not completed yet. */
  actionsOpen: number;
  /** The effectiveness criteria are written (what is measured, over what, what counts as success). */
  criteriaWritten: boolean;
};

export const capaEvents = [
  'approve_plan',
  'start_implementation',
  'open_effectiveness_check',
  'record_effective',
  'record_not_effective',
  'cancel',
] as const;
export type CapaEventType = (typeof capaEvents)[number];
export type CapaEvent = { type: CapaEventType; actor: CapaActor };

export interface CapaTransitionRules {
  reason?: 'required';
  signature?: 'approved' | 'effective' | 'not_effective';
}

const qa: readonly string[] = ['qa_investigator', 'qa_approver'];

type GuardArgs = { context: CapaContext; event: CapaEvent };

function independentQaApprover({ context, event }: GuardArgs): boolean {
  return event.actor.role === 'qa_approver' && event.actor.id !== context.ownerId;
}

const cancel = {
  target: 'cancelled',
  guard: 'byQa',
  actions: 'notifyCancelled',
  meta: { reason: 'required', signature: 'approved' },
} as const;

export const capaMachine = setup({
  types: {
    context: {} as CapaContext,
    events: {} as CapaEvent,
    transitionMeta: {} as CapaTransitionRules,
  },
  guards: {
    completePlanByIndependentApprover: (args) =>
      args.context.actionsPlanned > 0 && args.context.criteriaWritten && independentQaApprover(args),
    byOwner: ({ context, event }) => event.actor.id === context.ownerId,
    actionsDoneByOwnerOrQa: ({ context, event }) =>
      context.actionsPlanned > 0 &&
      context.actionsOpen === 0 &&
      (event.actor.id === context.ownerId || qa.includes(event.actor.role)),
    byIndependentApprover: (args) => independentQaApprover(args),
    byQa: ({ event }) => qa.includes(event.actor.role),
  },
  actions: {
    // Named here, performed by lib/capa inside the transaction that makes the change.
    notifyOwnerAssigned: () => {},
    notifyPlanApproved: () => {},
    notifyEffectivenessReview: () => {},
    notifyClosed: () => {},
    notifyNotEffective: () => {},
    notifyCancelled: () => {},
  },
}).createMachine({
  id: 'capa',
  initial: 'proposed' satisfies CapaState,
  entry: 'notifyOwnerAssigned',
  // Every stored CAPA is resolved with its own context; this one only serves a new record.
  context: { ownerId: 0, actionsPlanned: 0, actionsOpen: 0, criteriaWritten: false },
  states: {
    proposed: {
      on: {
        approve_plan: {
          target: 'plan_approved',
          guard: 'completePlanByIndependentApprover',
          actions: 'notifyPlanApproved',
          meta: { signature: 'approved' },
        },
        cancel,
      },
    },
    plan_approved: {
      on: {
        start_implementation: { target: 'implementation', guard: 'byOwner' },
        cancel,
      },
    },
    implementation: {
      on: {
        open_effectiveness_check: {
          target: 'effectiveness_check',
          guard: 'actionsDoneByOwnerOrQa',
          actions: 'notifyEffectivenessReview',
        },
        cancel,
      },
    },
    effectiveness_check: {
      on: {
        record_effective: {
          target: 'closed_effective',
          guard: 'byIndependentApprover',
          actions: 'notifyClosed',
          meta: { signature: 'effective' },
        },
        record_not_effective: {
          target: 'proposed',
          guard: 'byIndependentApprover',
          actions: 'notifyNotEffective',
          meta: { reason: 'required', signature: 'not_effective' },
        },
        cancel,
      },
    },
    closed_effective: { type: 'final' },
    cancelled: { type: 'final' },
  },
});

/**
 * What a person is told when a guard turns them away. One guard per transition, so each message
 * names every condition its transition checks.
 */
export const capaGuardRefusals: Record<keyof typeof capaMachine.implementations.guards, string> = {
  completePlanByIndependentApprover:
    'The plan can be approved only once it has at least one action and its effectiveness criteria are written, ' +
    'and only by a QA approver who does not own this CAPA (segregation of duties).',
  byOwner: 'Only the owner of this CAPA can start its implementation.',
  actionsDoneByOwnerOrQa:
    'The effectiveness check opens only once every action of the plan is completed, and only by the CAPA owner or QA.',
  byIndependentApprover:
    'Only a QA approver who does not own this CAPA can record whether it was effective (segregation of duties).',
  byQa: 'Only QA can cancel a CAPA.',
};
