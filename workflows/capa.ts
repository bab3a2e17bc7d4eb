/*
 * CAPA lifecycle. A CAPA opens as proposed, raised from a deviation, a complaint or a trend, and
 * while proposed its owner (a QA investigator) plans it: the problem, the root cause, the corrective
 * and preventive actions with their owners and due dates, and the effectiveness criteria, written
 * before anything is done so success cannot be redefined afterwards. A QA approver who does not own
 * the CAPA signs the plan "approved"; the owner then starts the implementation, and each action owner
 * records their action as done with evidence. Once every action of the plan is completed, the owner
 * or QA opens the effectiveness check (the mail worker does it as the owner when the criterion's
 * period has run). An independent QA approver signs the outcome: "effective" closes the CAPA;
 * "not effective", with the reason, sends it back to proposed, where a new round of actions is planned
 * and approved; the earlier actions stay on record. QA may cancel an open CAPA with a reason and a
 * signature. Closed and cancelled are final.
 *
 * Who counts as independent (not the owner, the creator, an action owner or whoever completed an
 * action; a cancel not by the owner) is declared by the record kind (lib/capa/kind.ts) per event,
 * with the other rules on who sees and edits a CAPA; the guards here say only what the lifecycle
 * itself needs.
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

const isQaApprover = (actor: CapaActor) => actor.role === 'qa_approver';

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
    completePlanByApprover: ({ context, event }) => context.actionsPlanned > 0 && context.criteriaWritten && isQaApprover(event.actor),
    byOwner: ({ context, event }) => event.actor.id === context.ownerId,
    actionsDoneByOwnerOrQa: ({ context, event }) =>
      context.actionsPlanned > 0 &&
      context.actionsOpen === 0 &&
      (event.actor.id === context.ownerId || qa.includes(event.actor.role)),
    byApprover: ({ event }) => isQaApprover(event.actor),
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
          guard: 'completePlanByApprover',
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
          guard: 'byApprover',
          actions: 'notifyClosed',
          meta: { signature: 'effective' },
        },
        record_not_effective: {
          target: 'proposed',
          guard: 'byApprover',
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
  completePlanByApprover:
    'The plan can be approved by a QA approver once it has at least one action and its effectiveness criteria are written.',
  byOwner: 'Only the owner of this CAPA can start its implementation.',
  actionsDoneByOwnerOrQa:
    'The effectiveness check opens only once every action of the plan is completed, and only by the CAPA owner or QA.',
  byApprover: 'Only a QA approver can record whether a CAPA was effective.',
  byQa: 'Only QA can cancel a CAPA.',
};
