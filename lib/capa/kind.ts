import 'server-only';
import { asc, eq } from 'drizzle-orm';
import type { DbOrTx, Tx } from '../../db/client';
import { capaActions, capas } from '../../db/schema';
import { capaGuardRefusals, capaMachine } from '../../workflows/capa';
import type { CapaState } from '../../workflows/states';
import { type Notice, type Recipient, activeUsers, activeUsersWithRole, sendNotice } from '../mail/record-notice';
import { type EvidenceDigest, listEvidenceDigests } from '../records/facts';
import { type RecordActor, defineRecordKind, independentPeople } from '../records/kind';
import { type CapaSource, capaEventLabels, capaStateLabels } from './labels';
import { mailEffectivenessReviewLinks } from './review-links';

/*
 * CAPAs on the write path: who edits the plan (its owner), who reassigns it, who completes an action
 * (its owner), who may not approve the plan or judge its effectiveness (the owner, whoever opened
 * it, the action owners and whoever completed an action), what each signature covers, and mail.
 * Nothing else in the product restates these rules.
 */

export type CapaRow = typeof capas.$inferSelect;

export interface CapaDto {
  id: number;
  number: string;
  status: CapaState;
  version: number;
  title: string;
  sourceType: CapaSource;
  sourceId: number | null;
  problemStatement: string;
  rootCause: string | null;
  effectivenessCriteria: string | null;
  /** JSON text of the recurrence criterion (lib/capa/schemas.ts), or null. */
  recurrenceCriterion: string | null;
  effectivenessResult: 'effective' | 'not_effective' | null;
  effectivenessNote: string | null;
  cancelReason: string | null;
  ownerId: number;
  createdBy: number;
  planRound: number;
  actionsPlanned: number;
  actionsOpen: number;
  /** ISO 8601, UTC. */
  dueAt: string | null;
  effectivenessDueAt: string | null;
  actionsCompletedAt: string | null;
  planApprovedAt: string | null;
  effectivenessOpenedAt: string | null;
  closedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

const iso = (d: Date | null) => d?.toISOString() ?? null;

export function toCapaDto(row: CapaRow): CapaDto {
  return {
    id: row.id,
    number: row.number,
    status: row.status,
    version: row.version,
    title: row.title,
    sourceType: row.sourceType,
    sourceId: row.sourceId,
    problemStatement: row.problemStatement,
    rootCause: row.rootCause,
    effectivenessCriteria: row.effectivenessCriteria,
    recurrenceCriterion: row.recurrenceCriterion,
    effectivenessResult: row.effectivenessResult,
    effectivenessNote: row.effectivenessNote,
    cancelReason: row.cancelReason,
    ownerId: row.ownerId,
    createdBy: row.createdBy,
    planRound: row.planRound,
    actionsPlanned: row.actionsPlanned,
    actionsOpen: row.actionsOpen,
    dueAt: iso(row.dueAt),
    effectivenessDueAt: iso(row.effectivenessDueAt),
    actionsCompletedAt: iso(row.actionsCompletedAt),
    planApprovedAt: iso(row.planApprovedAt),
    effectivenessOpenedAt: iso(row.effectivenessOpenedAt),
    closedAt: iso(row.closedAt),
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/**
 * Columns whose every change is audited (21 CFR 11.10(e)). The action counters are left out: they
 * follow from the action changes, which are audited themselves, field by field.
 */
export const capaAuditFields = [
  'title',
  'sourceType',
  'sourceId',
  'problemStatement',
  'rootCause',
  'effectivenessCriteria',
  'recurrenceCriterion',
  'effectivenessResult',
  'effectivenessNote',
  'cancelReason',
  'ownerId',
  'createdBy',
  'planRound',
  'dueAt',
  'effectivenessDueAt',
  'actionsCompletedAt',
  'planApprovedAt',
  'effectivenessOpenedAt',
  'closedAt',
] as const satisfies readonly (keyof CapaRow)[];

export type CapaActionRow = typeof capaActions.$inferSelect;

/** What the CAPA's rules read beyond its row: every action of every round, and the files on it. */
export interface CapaFacts {
  actions: CapaActionRow[];
  evidence: EvidenceDigest[];
}

async function capaFacts(dbOrTx: DbOrTx, row: CapaRow): Promise<CapaFacts> {
  const [actions, evidence] = await Promise.all([
    dbOrTx.select().from(capaActions).where(eq(capaActions.capaId, row.id)).orderBy(asc(capaActions.id)),
    listEvidenceDigests(dbOrTx, 'capa', row.id),
  ]);
  return { actions, evidence };
}

const currentRound = (row: CapaRow, facts: CapaFacts) => facts.actions.filter((a) => a.round === row.planRound);

/*
 * What a CAPA signature vouches for (21 CFR 11.70). The plan approval covers the plan and every
 * action planned (what, by whom, by when); the effectiveness decision covers that plus how each
 * action was completed, its evidence and every file's SHA-256. Lifecycle times, counters and the
 * outcome itself are left out: the outcome is the signature's meaning, and completing the actions
 * must not make the plan approval read as "changed after signing".
 */
const signedParts = {
  plan: (row: CapaRow) => ({
    number: row.number,
    title: row.title,
    sourceType: row.sourceType,
    sourceId: row.sourceId,
    problemStatement: row.problemStatement,
    rootCause: row.rootCause,
    effectivenessCriteria: row.effectivenessCriteria,
    recurrenceCriterion: row.recurrenceCriterion,
    ownerId: row.ownerId,
  }),
  // One part per round, so the approval of round 1 is not touched by the actions of round 2.
  actions: (facts: CapaFacts) =>
    byRound(facts, 'actions', (a) => ({ id: a.id, kind: a.kind, category: a.category, description: a.description, ownerId: a.ownerId, dueAt: a.dueAt })),
  completion: (facts: CapaFacts) => byRound(facts, 'completion', (a) => ({ id: a.id, completedAt: a.completedAt, completedBy: a.completedBy, evidence: a.evidence })),
};

function byRound(facts: CapaFacts, part: string, view: (a: CapaActionRow) => Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, Record<string, unknown>[]> = {};
  for (const a of facts.actions) (out[`${part}:round ${a.round}`] ??= []).push(view(a));
  return out;
}

/** States in which the CAPA is still open. */
const openStates = ['proposed', 'plan_approved', 'implementation', 'effectiveness_check'] as const satisfies readonly CapaState[];
const ownerOnly = { of: (row: CapaRow) => [row.ownerId] };

/** A notice about this CAPA to staff (lib/mail/record-notice.ts), linking to its page. */
export function capaNotice(tx: Tx, capa: Pick<CapaRow, 'id' | 'number' | 'version'>, recipients: readonly Recipient[], actor: RecordActor, n: Notice) {
  return sendNotice(
    tx,
    { recordType: 'capa', id: capa.id, version: capa.version, label: capa.number, path: `/capa/${capa.id}`, linkLabel: 'Open the CAPA' },
    recipients,
    actor,
    n,
  );
}

/** QA approvers who may sign this step on this CAPA (segregation of duties), to be asked by e-mail. */
export async function eligibleApprovers(tx: DbOrTx, capa: CapaRow, event: 'approve_plan' | 'record_effective'): Promise<Recipient[]> {
  return independentPeople(capaKind, capa, await capaFacts(tx, capa), event, await activeUsersWithRole(tx, ['qa_approver']));
}

function actionIdOf(params: unknown): number | null {
  const id = (params as { actionId?: unknown } | undefined)?.actionId;
  return typeof id === 'number' ? id : null;
}

export const capaKind = defineRecordKind({
  recordType: 'capa',
  noun: 'CAPA',
  table: capas,
  machine: capaMachine,
  readPermission: 'capa.read',
  owners: (t) => [t.ownerId],
  related: capaFacts,
  eventPermissions: {
    approve_plan: 'capa.approve',
    start_implementation: 'capa.plan',
    open_effectiveness_check: 'capa.plan',
    record_effective: 'capa.approve',
    record_not_effective: 'capa.approve',
    cancel: 'capa.cancel',
  },
  eventLabels: capaEventLabels,
  stateLabels: capaStateLabels,
  guardRefusals: capaGuardRefusals,
  context: (row, facts) => ({
    ownerId: row.ownerId,
    actionsPlanned: currentRound(row, facts).length,
    actionsOpen: currentRound(row, facts).filter((a) => a.completedAt === null).length,
    criteriaWritten: Boolean(row.effectivenessCriteria?.trim()),
  }),
  participants: {
    owner: { did: 'own this CAPA', of: (row) => [row.ownerId] },
    creator: { did: 'opened this CAPA', of: (row) => [row.createdBy] },
    actionOwner: { did: 'own one of its actions', of: (_row, facts) => facts.actions.map((a) => a.ownerId) },
    actionCompleter: { did: 'completed one of its actions', of: (_row, facts) => facts.actions.map((a) => a.completedBy) },
  },
  // Nobody approves a plan, or judges the effectiveness of work, that is theirs (ICH Q10 3.2.2).
  independence: {
    approve_plan: ['owner', 'creator', 'actionOwner'],
    record_effective: ['owner', 'creator', 'actionOwner', 'actionCompleter'],
    record_not_effective: ['owner', 'creator', 'actionOwner', 'actionCompleter'],
    cancel: ['owner'],
  },
  sections: {
    plan: {
      label: 'Editing the plan',
      permission: 'capa.plan',
      states: ['proposed'],
      holders: { ...ownerOnly, refusal: 'Only the owner of this CAPA edits its plan; a QA approver can reassign it.' },
    },
    actions: {
      label: 'Planning the actions',
      permission: 'capa.plan',
      states: ['proposed'],
      holders: { ...ownerOnly, refusal: 'Only the owner of this CAPA plans its actions; a QA approver can reassign it.' },
    },
    approval_request: {
      label: 'Asking for the plan’s approval',
      permission: 'capa.plan',
      states: ['proposed'],
      holders: { ...ownerOnly, refusal: 'Only the owner of this CAPA asks for its plan to be approved.' },
      bumpsVersion: false,
    },
    owner: {
      label: 'Reassigning the owner',
      permission: 'capa.reassign',
      states: openStates,
      ownScope: { of: (row) => [row.ownerId], refusal: 'Only the owner of this CAPA or a QA approver hands it to someone else.' },
    },
    // 21 CFR 820.100(a)(7): the activities and their results are documented by those who did them.
    completion: {
      label: 'Completing an action',
      permission: 'capa.complete_action',
      states: ['implementation'],
      ownScope: {
        of: (row, facts, params) =>
          currentRound(row, facts)
            .filter((a) => (actionIdOf(params) === null ? a.completedAt === null : a.id === actionIdOf(params)))
            .map((a) => a.ownerId),
        refusal: 'Only the owner of this action records it as completed.',
      },
      condition: {
        holds: (row, facts, params) => {
          const id = actionIdOf(params);
          return id === null ? currentRound(row, facts).some((a) => a.completedAt === null) : currentRound(row, facts).some((a) => a.id === id && a.completedAt === null);
        },
        refusal: 'This action is already recorded as completed (or belongs to an earlier round); it stays on record as it is.',
      },
    },
    evidence: {
      label: 'Adding evidence',
      permission: 'attachment.add',
      states: openStates,
      stateRefusal: 'Evidence can no longer be added once a CAPA is closed or cancelled. Raise a new record if something new turns up.',
      ownScope: {
        of: (row, facts) =>
          row.status === 'plan_approved' || row.status === 'implementation'
            ? [row.ownerId, ...currentRound(row, facts).map((a) => a.ownerId)]
            : [row.ownerId],
        refusal: 'Only the CAPA owner, QA and, once the plan is approved, the owners of its actions add evidence to it.',
      },
    },
    review_link: {
      label: 'Asking for a fresh review link',
      permission: 'capa.approve',
      states: ['effectiveness_check'],
      independentOf: ['owner', 'creator', 'actionOwner', 'actionCompleter'],
      bumpsVersion: false,
    },
    comments: { label: 'Commenting', permission: 'capa.read', states: 'any', bumpsVersion: false },
  },
  signedContent: {
    approved: (row, facts) => ({ plan: signedParts.plan(row), ...signedParts.actions(facts) }),
    effective: (row, facts) => ({
      plan: signedParts.plan(row),
      ...signedParts.actions(facts),
      ...signedParts.completion(facts),
      evidence: facts.evidence,
    }),
    not_effective: (row, facts) => ({
      plan: signedParts.plan(row),
      ...signedParts.actions(facts),
      ...signedParts.completion(facts),
      evidence: facts.evidence,
    }),
  },
  signedPartLabels: {
    plan: 'the plan',
    actions: 'the planned actions',
    completion: 'how the actions were completed',
    evidence: 'the evidence files',
  },
  auditFields: capaAuditFields,
  toDto: toCapaDto,
  effects: {
    notifyOwnerAssigned: {
      async inTransaction(tx, { actor, after }) {
        await capaNotice(tx, after, await activeUsers(tx, [after.ownerId]), actor, {
          key: 'capa-owner',
          template: 'capa_owner_assigned',
          subject: `CAPA ${after.number} assigned to you`,
          heading: `You own ${after.number}`,
          paragraphs: [
            `${actor.name} opened CAPA ${after.number}: ${after.title}, with you as its owner.`,
            'Plan it: the problem, the root cause, the corrective and preventive actions with their owners and due dates, and the effectiveness criteria.',
          ],
          footer: 'You receive this because you are the owner of this CAPA.',
        });
      },
    },
    notifyPlanApproved: {
      async inTransaction(tx, { actor, after }) {
        await capaNotice(tx, after, await activeUsers(tx, [after.ownerId]), actor, {
          key: 'capa-plan-approved',
          template: 'capa_plan_approved',
          subject: `CAPA ${after.number}: plan approved`,
          heading: `The plan of ${after.number} is approved`,
          paragraphs: [`${actor.name} approved and signed the plan of ${after.number}: ${after.title}.`, 'Start the implementation when the work begins.'],
          footer: 'You receive this because you are the owner of this CAPA.',
        });
      },
    },
    notifyEffectivenessReview: {
      async inTransaction(tx, { actor, after }) {
        // A personal one-time review link per approver (lib/capa/review-links.ts), not a plain link.
        await mailEffectivenessReviewLinks(tx, actor.name, after, await eligibleApprovers(tx, after, 'record_effective'));
      },
    },
    notifyClosed: {
      async inTransaction(tx, { actor, after }) {
        await capaNotice(tx, after, await activeUsers(tx, [after.ownerId, after.createdBy]), actor, {
          key: 'capa-closed',
          template: 'capa_closed',
          subject: `CAPA ${after.number} closed as effective`,
          heading: `${after.number} closed as effective`,
          paragraphs: [`${actor.name} reviewed the evidence of ${after.number}: ${after.title}, and signed it effective.`],
          footer: 'You receive this because you own or opened this CAPA.',
        });
      },
    },
    notifyNotEffective: {
      async inTransaction(tx, { actor, after }) {
        await capaNotice(tx, after, await activeUsers(tx, [after.ownerId]), actor, {
          key: 'capa-not-effective',
          template: 'capa_returned',
          subject: `CAPA ${after.number} was not effective: plan new actions`,
          heading: `${after.number} returned to planning`,
          paragraphs: [
            `${actor.name} found that the actions of ${after.number}: ${after.title} did not achieve the effectiveness criteria.`,
            after.effectivenessNote ? `Reason: ${after.effectivenessNote}` : 'The reason is in the timeline.',
            'Plan the next actions; the earlier ones stay on record.',
          ],
          footer: 'You receive this because you are the owner of this CAPA.',
        });
      },
    },
    notifyCancelled: {
      async inTransaction(tx, { actor, after }) {
        await capaNotice(tx, after, await activeUsers(tx, [after.ownerId, after.createdBy]), actor, {
          key: 'capa-cancelled',
          template: 'capa_cancelled',
          subject: `CAPA ${after.number} cancelled`,
          heading: `${after.number} cancelled`,
          paragraphs: [`${actor.name} cancelled ${after.number}: ${after.title}.`, after.cancelReason ? `Reason: ${after.cancelReason}` : ''].filter(Boolean),
          footer: 'You receive this because you own or opened this CAPA.',
        });
      },
    },
  },
});

export function planApprovalMail(actor: RecordActor, after: CapaRow, actionsPlanned: number): Notice {
  return {
    key: 'capa-plan-approval',
    template: 'capa_plan_approval_requested',
    subject: `CAPA ${after.number}: plan awaits approval`,
    heading: `The plan of ${after.number} awaits approval`,
    paragraphs: [
      `${actor.name} asks for approval of the plan of ${after.number}: ${after.title} (${actionsPlanned} action${actionsPlanned === 1 ? '' : 's'}).`,
      'Read the problem, the root cause, the actions and the effectiveness criteria, then approve and sign the plan.',
    ],
    footer: 'You receive this because you are a QA approver who does not own this CAPA.',
  };
}
