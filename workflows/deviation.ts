/*
 * Deviation lifecycle. Someone on the floor or in QA writes a draft about what went wrong and
 * submits it; submitting reports it and puts the batches it names on hold. A QA investigator starts
 * triage, classifies it and either, for a minor deviation, has a QA approver close it at once with a
 * written justification and an "approved" signature, or assigns an investigator and opens the
 * investigation. The assigned investigator finishes the investigation and submits it for approval,
 * signing as its author. A QA approver either returns it for rework with a comment or approves it with
 * an "approved" signature, which gives each held batch its disposition. Closing, either way, needs a
 * disposition for every held batch. Once reported and until it is in approval, QA may cancel a
 * deviation raised in error or twice, with a reason and a signature. A draft is its author's until
 * submitted: only they may discard it, and a discarded draft stays theirs alone. Closed, cancelled
 * and discarded are final.
 *
 * Segregation of duties is a rule, not a habit: nobody approves, closes, returns or cancels a
 * deviation they raised or investigated. The record kind (lib/deviations/kind.ts) declares it per
 * event, with everything else about who may see and change a deviation; the guards here say only
 * what the lifecycle itself needs (the role that sends an event, and the record being ready).
 *
 * Guards read only the actor and the context (the stored record), never the event's payload, so the
 * write path can ask which events a person may send before they type anything. Each transition's
 * `meta` says what it asks of that person: a reason, a signature and its meaning. Actions only name
 * an effect; lib/ performs it.
 */
import { setup } from 'xstate';
import type { DeviationState } from './states';

export interface DeviationActor {
  id: number;
  role: string;
}

export type DeviationClassification = 'critical' | 'major' | 'minor';

/** What the guards know about the stored deviation (a type, not an interface, so it is a plain record). */
export type DeviationContext = {
  raisedBy: number;
  investigatorId: number | null;
  classification: DeviationClassification | null;
  /** Batches this deviation put on hold that have no disposition yet. */
  heldBatchesWithoutDisposition: number;
};

export const deviationEvents = [
  'submit',
  'discard',
  'start_triage',
  'close_minor',
  'assign_investigation',
  'submit_for_approval',
  'return_for_rework',
  'approve',
  'cancel',
] as const;
export type DeviationEventType = (typeof deviationEvents)[number];
export type DeviationEvent = { type: DeviationEventType; actor: DeviationActor };

export interface DeviationTransitionRules {
  reason?: 'required';
  signature?: 'investigation_complete' | 'approved';
}

const floorAndQa: readonly string[] = ['operator', 'supervisor', 'qa_investigator', 'qa_approver'];
const qa: readonly string[] = ['qa_investigator', 'qa_approver'];

const isQaApprover = (actor: DeviationActor) => actor.role === 'qa_approver';

export const deviationMachine = setup({
  types: {
    context: {} as DeviationContext,
    events: {} as DeviationEvent,
    transitionMeta: {} as DeviationTransitionRules,
  },
  guards: {
    byItsAuthor: ({ context, event }) => floorAndQa.includes(event.actor.role) && event.actor.id === context.raisedBy,
    byQaInvestigator: ({ event }) => event.actor.role === 'qa_investigator',
    byQaInvestigatorOnceAssigned: ({ context, event }) =>
      event.actor.role === 'qa_investigator' && context.investigatorId !== null,
    minorByApproverWithBatchesDisposed: ({ context, event }) =>
      context.classification === 'minor' && context.heldBatchesWithoutDisposition === 0 && isQaApprover(event.actor),
    byAssignedInvestigator: ({ context, event }) =>
      event.actor.role === 'qa_investigator' && event.actor.id === context.investigatorId,
    byQaApprover: ({ event }) => event.actor.role === 'qa_approver',
    byApproverWithBatchesDisposed: ({ context, event }) => context.heldBatchesWithoutDisposition === 0 && isQaApprover(event.actor),
    byQa: ({ event }) => qa.includes(event.actor.role),
  },
  actions: {
    // Named here, performed by lib/ inside the transaction that makes the change.
    holdBatches: () => {},
    notifyInvestigatorAssigned: () => {},
    notifyApprovalRequested: () => {},
    notifyReturnedForRework: () => {},
    applyDispositions: () => {},
    notifyClosed: () => {},
  },
}).createMachine({
  id: 'deviation',
  initial: 'draft' satisfies DeviationState,
  // Every stored deviation is resolved with its own context; this one only serves a new draft, and
  // its author id 0 matches no user, so nothing can be sent to it before the row exists.
  context: { raisedBy: 0, investigatorId: null, classification: null, heldBatchesWithoutDisposition: 0 },
  states: {
    draft: {
      on: {
        submit: { target: 'reported', guard: 'byItsAuthor', actions: 'holdBatches' },
        discard: { target: 'discarded', guard: 'byItsAuthor' },
      },
    },
    reported: {
      on: {
        start_triage: { target: 'triage', guard: 'byQaInvestigator' },
        cancel: { target: 'cancelled', guard: 'byQa', meta: { reason: 'required', signature: 'approved' } },
      },
    },
    triage: {
      on: {
        close_minor: {
          target: 'closed',
          guard: 'minorByApproverWithBatchesDisposed',
          actions: ['applyDispositions', 'notifyClosed'],
          meta: { reason: 'required', signature: 'approved' },
        },
        assign_investigation: {
          target: 'investigation',
          guard: 'byQaInvestigatorOnceAssigned',
          actions: 'notifyInvestigatorAssigned',
        },
        cancel: { target: 'cancelled', guard: 'byQa', meta: { reason: 'required', signature: 'approved' } },
      },
    },
    investigation: {
      on: {
        submit_for_approval: {
          target: 'approval',
          guard: 'byAssignedInvestigator',
          actions: 'notifyApprovalRequested',
          // "Investigation complete": the investigator signs as the author of the investigation.
          meta: { signature: 'investigation_complete' },
        },
        cancel: { target: 'cancelled', guard: 'byQa', meta: { reason: 'required', signature: 'approved' } },
      },
    },
    approval: {
      on: {
        return_for_rework: {
          target: 'investigation',
          guard: 'byQaApprover',
          actions: 'notifyReturnedForRework',
          meta: { reason: 'required' },
        },
        approve: {
          target: 'closed',
          guard: 'byApproverWithBatchesDisposed',
          actions: ['applyDispositions', 'notifyClosed'],
          meta: { signature: 'approved' },
        },
      },
    },
    closed: { type: 'final' },
    cancelled: { type: 'final' },
    discarded: { type: 'final' },
  },
});

/**
 * What a person is told when a guard turns them away. One guard per transition (the write path
 * reports one guard by name), so each message names every condition that transition checks.
 */
export const deviationGuardRefusals: Record<keyof typeof deviationMachine.implementations.guards, string> = {
  byItsAuthor: 'Only the person who wrote this draft can submit or discard it.',
  byQaInvestigator: 'Only a QA investigator can start the triage of a deviation.',
  byQaInvestigatorOnceAssigned:
    'Only a QA investigator can open the investigation, and only once an investigator has been assigned.',
  minorByApproverWithBatchesDisposed:
    'Only a minor deviation can be closed at triage, by a QA approver, once every held batch has a disposition ' +
    '(record them under "Held batches").',
  byAssignedInvestigator: 'Only the investigator assigned to this deviation can submit its investigation for approval.',
  byQaApprover: 'Only a QA approver can return an investigation for rework.',
  byApproverWithBatchesDisposed:
    'A deviation is approved by a QA approver once every held batch has a disposition (record them under "Held batches").',
  byQa: 'Only a QA investigator or QA approver can cancel a deviation.',
};
