/*
 * Complaint lifecycle. Anyone on site may take a complaint down for a caller (received). A QA
 * investigator starts the assessment and becomes the complaint's owner; they record the category,
 * whether it is an adverse event and whether it is serious, and whether the regulator must be told
 * (with the deadline the clocks module computes), then sign that decision ("reportability decided").
 * Signing sends it on to the investigation, or, when the assessment rules out a quality defect, straight
 * to the response with a written justification for skipping the investigation. The QA investigator
 * completes the investigation (retained samples, the batch's deviations, links to a deviation or a
 * CAPA, a summary) and signs it ("investigation complete"). QA writes and sends the answer; a QA
 * approver then closes the complaint with an "approved" signature, once the answer has gone out.
 * That approver is a second person: not whoever took it down, owns it, decided its reportability,
 * signed its investigation, or wrote or sent the answer (declared by lib/complaints/kind.ts).
 * A closed complaint may be reopened by QA, with a reason, to the assessment (new information about
 * the event) or to the investigation (new findings).
 *
 * Guards read only the actor and the context (computed from the stored row), never the event's
 * payload. Each transition's `meta` says what it asks of the sender: a reason, a signature and its
 * meaning. Actions only name an effect; lib/complaints performs it.
 */
import { setup } from 'xstate';
import type { ComplaintState } from './states';

export interface ComplaintActor {
  id: number;
  role: string;
}

/** What the guards know about the stored complaint. */
export type ComplaintContext = {
  ownerId: number | null;
  /** Category, adverse event, seriousness, reportability (with kind) and rationale are recorded. */
  assessmentRecorded: boolean;
  /** False only when the category rules out a quality defect (e.g. no defect found). */
  qualityDefectPossible: boolean;
  /** Retained samples decided and a summary written. */
  investigationRecorded: boolean;
  /** The answer went out by e-mail or by post. */
  responseSent: boolean;
};

export const complaintEvents = [
  'start_assessment',
  'complete_assessment',
  'skip_investigation',
  'complete_investigation',
  'close',
  'reopen_assessment',
  'reopen_investigation',
] as const;
export type ComplaintEventType = (typeof complaintEvents)[number];
export type ComplaintEvent = { type: ComplaintEventType; actor: ComplaintActor };

export interface ComplaintTransitionRules {
  reason?: 'required';
  signature?: 'reportability_decided' | 'investigation_complete' | 'approved';
}

const qa: readonly string[] = ['qa_investigator', 'qa_approver'];

type GuardArgs = { context: ComplaintContext; event: ComplaintEvent };

const isQaInvestigator = ({ event }: GuardArgs) => event.actor.role === 'qa_investigator';

export const complaintMachine = setup({
  types: {
    context: {} as ComplaintContext,
    events: {} as ComplaintEvent,
    transitionMeta: {} as ComplaintTransitionRules,
  },
  guards: {
    byQaInvestigator: (args) => isQaInvestigator(args),
    assessedByQaInvestigator: (args) => isQaInvestigator(args) && args.context.assessmentRecorded,
    noDefectPossibleAssessedByQaInvestigator: (args) =>
      isQaInvestigator(args) && args.context.assessmentRecorded && !args.context.qualityDefectPossible,
    investigatedByQaInvestigator: (args) => isQaInvestigator(args) && args.context.investigationRecorded,
    answeredClosedByQaApprover: ({ context, event }) => event.actor.role === 'qa_approver' && context.responseSent,
    byQa: ({ event }) => qa.includes(event.actor.role),
  },
  actions: {
    // Named here, performed by lib/complaints inside the transaction that makes the change.
    notifyQaOfNewComplaint: () => {},
    notifyOwnerReopened: () => {},
  },
}).createMachine({
  id: 'complaint',
  initial: 'received' satisfies ComplaintState,
  entry: 'notifyQaOfNewComplaint',
  // Every stored complaint is resolved with its own context; this one only serves a new record.
  context: { ownerId: null, assessmentRecorded: false, qualityDefectPossible: true, investigationRecorded: false, responseSent: false },
  states: {
    received: {
      on: {
        start_assessment: { target: 'assessment', guard: 'byQaInvestigator' },
      },
    },
    assessment: {
      on: {
        complete_assessment: {
          target: 'investigation',
          guard: 'assessedByQaInvestigator',
          meta: { signature: 'reportability_decided' },
        },
        skip_investigation: {
          target: 'response',
          guard: 'noDefectPossibleAssessedByQaInvestigator',
          // The justification is the reason; the signature covers the decision it rests on.
          meta: { reason: 'required', signature: 'reportability_decided' },
        },
      },
    },
    investigation: {
      on: {
        complete_investigation: {
          target: 'response',
          guard: 'investigatedByQaInvestigator',
          meta: { signature: 'investigation_complete' },
        },
      },
    },
    response: {
      on: {
        close: {
          target: 'closed',
          guard: 'answeredClosedByQaApprover',
          meta: { signature: 'approved' },
        },
      },
    },
    closed: {
      on: {
        reopen_assessment: { target: 'assessment', guard: 'byQa', actions: 'notifyOwnerReopened', meta: { reason: 'required' } },
        reopen_investigation: { target: 'investigation', guard: 'byQa', actions: 'notifyOwnerReopened', meta: { reason: 'required' } },
      },
    },
  },
});

/**
 * What a person is told when a guard turns them away. One guard per transition, so each message
 * names every condition its transition checks.
 */
export const complaintGuardRefusals: Record<keyof typeof complaintMachine.implementations.guards, string> = {
  byQaInvestigator: 'Only a QA investigator can start the assessment of a complaint.',
  assessedByQaInvestigator:
    'The assessment can be signed only by a QA investigator, once the category, the adverse-event answers, the reportability decision and its rationale are recorded.',
  noDefectPossibleAssessedByQaInvestigator:
    'The investigation can be skipped only by a QA investigator, once the assessment is recorded and its category rules out a quality defect.',
  investigatedByQaInvestigator:
    'The investigation can be signed only by a QA investigator, once the retained-sample check and the summary are recorded.',
  answeredClosedByQaApprover: 'Only a QA approver can close a complaint, and only once the answer has been sent to the complainant.',
  byQa: 'Only QA can reopen a closed complaint.',
};
