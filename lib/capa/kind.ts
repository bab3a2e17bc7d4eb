import 'server-only';
import { and, eq, inArray } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { capas, users } from '../../db/schema';
import { capaGuardRefusals, capaMachine } from '../../workflows/capa';
import type { CapaState } from '../../workflows/states';
import { getEnv } from '../env';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import { type RecordActor, defineRecordKind } from '../records/kind';
import { type CapaSource, capaEventLabels, capaStateLabels } from './labels';
import { mailEffectivenessReviewLinks } from './review-links';

/* CAPAs on the write path: their table, machine, permissions, signed content and mail. */

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

/*
 * What a CAPA signature vouches for: the plan (problem, root cause, criteria, owner, which round of
 * the plan). Lifecycle times, counters and the outcome are left out so that completing the actions
 * does not make the plan approval read as "changed after signing" (21 CFR 11.70); the outcome is in
 * the meaning of the signature itself ("effective", "not effective"), and a reason (not effective,
 * cancelled) is recorded with the signature that gives it.
 */
export function capaSignedContent(row: CapaRow): Record<string, unknown> {
  return {
    number: row.number,
    title: row.title,
    sourceType: row.sourceType,
    sourceId: row.sourceId,
    problemStatement: row.problemStatement,
    rootCause: row.rootCause,
    effectivenessCriteria: row.effectivenessCriteria,
    recurrenceCriterion: row.recurrenceCriterion,
    ownerId: row.ownerId,
    planRound: row.planRound,
  };
}

export interface Recipient {
  id: number;
  email: string;
}

export interface CapaMail {
  key: string;
  template: string;
  subject: string;
  heading: string;
  paragraphs: string[];
  footer: string;
}

/** Queues one message per recipient in the caller's transaction; the actor and duplicates are skipped. */
export async function mailAboutCapa(
  tx: Tx,
  recipients: Recipient[],
  actor: RecordActor,
  capa: Pick<CapaRow, 'id' | 'number' | 'version'>,
  m: CapaMail,
): Promise<void> {
  const env = getEnv();
  const mail = renderMailLayout({
    siteName: env.SITE_NAME,
    recordNumber: capa.number,
    heading: m.heading,
    paragraphs: m.paragraphs,
    link: { url: new URL(`/capa/${capa.id}`, env.APP_URL).toString(), label: 'Open the CAPA' },
    footer: m.footer,
  });
  const seen = new Set<number>();
  for (const r of recipients) {
    if (r.id === actor.id || seen.has(r.id)) continue;
    seen.add(r.id);
    await enqueueMail(tx, {
      dedupeKey: `${m.key}:${capa.id}:v${capa.version}:${r.id}`,
      template: m.template,
      to: { address: r.email, userId: r.id },
      subject: m.subject,
      text: mail.text,
      html: mail.html,
      recordType: 'capa',
      recordId: capa.id,
    });
  }
}

export async function activeUsers(tx: Tx, ids: (number | null)[]): Promise<Recipient[]> {
  const wanted = ids.filter((i): i is number => i !== null);
  if (wanted.length === 0) return [];
  return tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(inArray(users.id, wanted), eq(users.active, true)));
}

/** QA approvers who may sign this CAPA: active, and not its owner (segregation of duties). */
export async function eligibleApprovers(tx: Tx, capa: Pick<CapaRow, 'ownerId'>): Promise<Recipient[]> {
  const approvers = await tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(eq(users.active, true), eq(users.role, 'qa_approver')));
  return approvers.filter((a) => a.id !== capa.ownerId);
}

export const capaKind = defineRecordKind({
  recordType: 'capa',
  noun: 'CAPA',
  table: capas,
  machine: capaMachine,
  readPermission: 'capa.read',
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
  ownerIds: (row) => [row.ownerId],
  context: (row) => ({
    ownerId: row.ownerId,
    actionsPlanned: row.actionsPlanned,
    actionsOpen: row.actionsOpen,
    criteriaWritten: Boolean(row.effectivenessCriteria?.trim()),
  }),
  signedContent: capaSignedContent,
  auditFields: capaAuditFields,
  toDto: toCapaDto,
  effects: {
    notifyOwnerAssigned: {
      async inTransaction(tx, { actor, after }) {
        await mailAboutCapa(tx, await activeUsers(tx, [after.ownerId]), actor, after, {
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
        await mailAboutCapa(tx, await activeUsers(tx, [after.ownerId]), actor, after, {
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
        await mailEffectivenessReviewLinks(tx, actor.name, after, await eligibleApprovers(tx, after));
      },
    },
    notifyClosed: {
      async inTransaction(tx, { actor, after }) {
        await mailAboutCapa(tx, await activeUsers(tx, [after.ownerId, after.createdBy]), actor, after, {
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
        await mailAboutCapa(tx, await activeUsers(tx, [after.ownerId]), actor, after, {
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
        await mailAboutCapa(tx, await activeUsers(tx, [after.ownerId, after.createdBy]), actor, after, {
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

export function planApprovalMail(actor: RecordActor, after: CapaRow): CapaMail {
  return {
    key: 'capa-plan-approval',
    template: 'capa_plan_approval_requested',
    subject: `CAPA ${after.number}: plan awaits approval`,
    heading: `The plan of ${after.number} awaits approval`,
    paragraphs: [
      `${actor.name} asks for approval of the plan of ${after.number}: ${after.title} (${after.actionsPlanned} action${after.actionsPlanned === 1 ? '' : 's'}).`,
      'Read the problem, the root cause, the actions and the effectiveness criteria, then approve and sign the plan.',
    ],
    footer: 'You receive this because you are a QA approver who does not own this CAPA.',
  };
}
