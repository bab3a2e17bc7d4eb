import 'server-only';
import { and, eq, inArray, ne } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { batches, deviationBatches, deviations, users } from '../../db/schema';
import { deviationGuardRefusals, deviationMachine } from '../../workflows/deviation';
import type { DeviationState } from '../../workflows/states';
import { diffFields, writeAudit } from '../audit';
import { getEnv } from '../env';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import { type RecordActor, defineRecordKind } from '../records/kind';
import { type Classification, classificationLabels, deviationEventLabels, deviationStateLabels } from './labels';

/* Deviations on the write path: their table, machine, permissions, signed content and effects. */

export type DeviationRow = typeof deviations.$inferSelect;

/** States in which a deviation still holds its batches. */
export const openDeviationStates = ['reported', 'triage', 'investigation', 'approval'] as const satisfies readonly DeviationState[];

export interface DeviationDto {
  id: number;
  /** Null while a draft: the number is given on submission. */
  number: string | null;
  status: DeviationState;
  version: number;
  title: string;
  whatHappened: string;
  immediateActions: string | null;
  lineStopped: boolean;
  capsulesSegregated: boolean;
  affectedCount: number | null;
  sampleDescription: string | null;
  defectId: number | null;
  productId: number | null;
  batchId: number | null;
  machineId: number | null;
  ringId: number | null;
  classification: Classification | null;
  classificationReason: string | null;
  severity: number | null;
  occurrence: number | null;
  detection: number | null;
  rpn: number | null;
  investigationReport: string | null;
  /** JSON text: up to five why/because steps (lib/deviations/investigation-schema.ts). */
  fiveWhys: string | null;
  /** JSON text: the marks on the six-branch cause-and-effect view. */
  causeAnalysis: string | null;
  rootCauseCategory: string | null;
  rootCause: string | null;
  productImpact: string | null;
  capaRequired: boolean | null;
  closureJustification: string | null;
  cancelReason: string | null;
  raisedBy: number;
  ownerId: number | null;
  investigatorId: number | null;
  /** ISO 8601, UTC. */
  occurredAt: string;
  reportedAt: string | null;
  dueAt: string | null;
  closedAt: string | null;
  updatedAt: string;
}

const iso = (d: Date | null) => d?.toISOString() ?? null;

export function toDeviationDto(row: DeviationRow): DeviationDto {
  return {
    id: row.id,
    number: row.number,
    status: row.status,
    version: row.version,
    title: row.title,
    whatHappened: row.whatHappened,
    immediateActions: row.immediateActions,
    lineStopped: row.lineStopped,
    capsulesSegregated: row.capsulesSegregated,
    affectedCount: row.affectedCount,
    sampleDescription: row.sampleDescription,
    defectId: row.defectId,
    productId: row.productId,
    batchId: row.batchId,
    machineId: row.machineId,
    ringId: row.ringId,
    classification: row.classification,
    classificationReason: row.classificationReason,
    severity: row.severity,
    occurrence: row.occurrence,
    detection: row.detection,
    rpn: row.rpn,
    investigationReport: row.investigationReport,
    fiveWhys: row.fiveWhys,
    causeAnalysis: row.causeAnalysis,
    rootCauseCategory: row.rootCauseCategory,
    rootCause: row.rootCause,
    productImpact: row.productImpact,
    capaRequired: row.capaRequired,
    closureJustification: row.closureJustification,
    cancelReason: row.cancelReason,
    raisedBy: row.raisedBy,
    ownerId: row.ownerId,
    investigatorId: row.investigatorId,
    occurredAt: row.occurredAt.toISOString(),
    reportedAt: iso(row.reportedAt),
    dueAt: iso(row.dueAt),
    closedAt: iso(row.closedAt),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** Columns whose every change is audited (21 CFR 11.10(e)); never updated_at. */
export const deviationAuditFields = [
  'number',
  'title',
  'whatHappened',
  'immediateActions',
  'lineStopped',
  'capsulesSegregated',
  'affectedCount',
  'sampleDescription',
  'defectId',
  'productId',
  'batchId',
  'machineId',
  'ringId',
  'classification',
  'classificationReason',
  'severity',
  'occurrence',
  'detection',
  'rpn',
  'investigationReport',
  'fiveWhys',
  'causeAnalysis',
  'rootCauseCategory',
  'rootCause',
  'productImpact',
  'capaRequired',
  'closureJustification',
  'cancelReason',
  'ownerId',
  'investigatorId',
  'occurredAt',
  'reportedAt',
  'dueAt',
  'closedAt',
] as const satisfies readonly (keyof DeviationRow)[];

/** What a signature on a deviation vouches for: the GMP content, never volatile columns. */
/*
 * What a deviation signature vouches for: the facts, the assessment and the investigation. The
 * lifecycle state is left out on purpose: a later step (approval after "investigation complete")
 * moves the state without changing what was signed, and must not make the earlier signature read
 * as "record changed after signing" (21 CFR 11.70 links a signature to the content it signed).
 */
export function deviationSignedContent(row: DeviationRow): Record<string, unknown> {
  return {
    number: row.number,
    title: row.title,
    whatHappened: row.whatHappened,
    immediateActions: row.immediateActions,
    defectId: row.defectId,
    productId: row.productId,
    batchId: row.batchId,
    machineId: row.machineId,
    ringId: row.ringId,
    classification: row.classification,
    classificationReason: row.classificationReason,
    severity: row.severity,
    occurrence: row.occurrence,
    detection: row.detection,
    rpn: row.rpn,
    investigationReport: row.investigationReport,
    fiveWhys: row.fiveWhys,
    causeAnalysis: row.causeAnalysis,
    rootCauseCategory: row.rootCauseCategory,
    rootCause: row.rootCause,
    productImpact: row.productImpact,
    capaRequired: row.capaRequired,
    closureJustification: row.closureJustification,
    cancelReason: row.cancelReason,
    investigatorId: row.investigatorId,
  };
}

const label = (row: DeviationRow) => row.number ?? `draft #${row.id}`;

export async function setBatchStatus(
  tx: Tx,
  actor: RecordActor,
  batchId: number,
  status: (typeof batches.$inferSelect)['status'],
  action: string,
  reason: string,
): Promise<void> {
  const [before] = await tx.select().from(batches).where(eq(batches.id, batchId)).for('update');
  if (!before || before.status === status) return;
  await tx
    .update(batches)
    .set({ status, version: before.version + 1 })
    .where(eq(batches.id, batchId));
  await writeAudit(tx, {
    actor: { id: actor.id, name: actor.name },
    recordType: 'batch',
    recordId: batchId,
    action,
    changes: diffFields(before, { ...before, status }, ['status']),
    reason,
  });
}

/** Whether any other open deviation still holds this batch (then a release here must not lift the hold). */
async function heldElsewhere(tx: Tx, batchId: number, deviationId: number): Promise<boolean> {
  const rows = await tx
    .select({ id: deviations.id })
    .from(deviationBatches)
    .innerJoin(deviations, eq(deviations.id, deviationBatches.deviationId))
    .where(
      and(
        eq(deviationBatches.batchId, batchId),
        eq(deviationBatches.onHold, true),
        ne(deviationBatches.deviationId, deviationId),
        inArray(deviations.status, [...openDeviationStates]),
      ),
    )
    .limit(1);
  return rows.length > 0;
}

interface Recipient {
  id: number;
  email: string;
}

async function mailTo(
  tx: Tx,
  recipients: Recipient[],
  actor: RecordActor,
  after: DeviationRow,
  m: { key: string; template: string; subject: string; heading: string; paragraphs: string[]; footer: string },
): Promise<void> {
  const env = getEnv();
  const mail = renderMailLayout({
    siteName: env.SITE_NAME,
    recordNumber: label(after),
    heading: m.heading,
    paragraphs: m.paragraphs,
    link: { url: new URL(`/deviations/${after.id}`, env.APP_URL).toString(), label: 'Open the deviation' },
    footer: m.footer,
  });
  const seen = new Set<number>();
  for (const r of recipients) {
    // The person who acted knows already; nobody gets two copies.
    if (r.id === actor.id || seen.has(r.id)) continue;
    seen.add(r.id);
    await enqueueMail(tx, {
      dedupeKey: `${m.key}:${after.id}:v${after.version}:${r.id}`,
      template: m.template,
      to: { address: r.email, userId: r.id },
      subject: m.subject,
      text: mail.text,
      html: mail.html,
      recordType: 'deviation',
      recordId: after.id,
    });
  }
}

async function activeUsers(tx: Tx, ids: (number | null)[]): Promise<Recipient[]> {
  const wanted = ids.filter((i): i is number => i !== null);
  if (wanted.length === 0) return [];
  return tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(inArray(users.id, wanted), eq(users.active, true)));
}

export const deviationKind = defineRecordKind({
  recordType: 'deviation',
  noun: 'deviation',
  table: deviations,
  machine: deviationMachine,
  readPermission: 'deviation.read',
  eventPermissions: {
    submit: 'deviation.edit_draft',
    start_triage: 'deviation.triage',
    assign_investigation: 'deviation.triage',
    submit_for_approval: 'deviation.investigate',
    return_for_rework: 'deviation.approve',
    approve: 'deviation.approve',
    close_minor: 'deviation.approve',
    cancel: 'deviation.cancel',
  },
  eventLabels: deviationEventLabels,
  stateLabels: deviationStateLabels,
  guardRefusals: deviationGuardRefusals,
  ownerIds: (row) => [row.raisedBy],
  // The count of held batches without a disposition needs a query, and context() is pure; the
  // approve and close_minor commands check it inside the transaction instead (lib/deviations/commands.ts).
  context: (row) => ({
    raisedBy: row.raisedBy,
    investigatorId: row.investigatorId,
    classification: row.classification,
    heldBatchesWithoutDisposition: 0,
  }),
  signedContent: deviationSignedContent,
  auditFields: deviationAuditFields,
  toDto: toDeviationDto,
  effects: {
    holdBatches: {
      async inTransaction(tx, { actor, after }) {
        const held = await tx
          .select({ batchId: deviationBatches.batchId })
          .from(deviationBatches)
          .where(and(eq(deviationBatches.deviationId, after.id), eq(deviationBatches.onHold, true)));
        for (const { batchId } of held) {
          const [batch] = await tx.select({ status: batches.status }).from(batches).where(eq(batches.id, batchId));
          // A rejected batch is already out of the supply chain; a hold would only hide that decision.
          if (!batch || batch.status === 'rejected') continue;
          await setBatchStatus(tx, actor, batchId, 'on_hold', 'hold', `Put on hold by deviation ${label(after)}`);
        }
      },
    },
    applyDispositions: {
      async inTransaction(tx, { actor, after }) {
        const held = await tx
          .select({ batchId: deviationBatches.batchId, disposition: deviationBatches.disposition })
          .from(deviationBatches)
          .where(and(eq(deviationBatches.deviationId, after.id), eq(deviationBatches.onHold, true)));
        for (const { batchId, disposition } of held) {
          const why = `Disposition ${disposition} on closing deviation ${label(after)}`;
          if (disposition === 'reject') {
            await setBatchStatus(tx, actor, batchId, 'rejected', 'disposition', why);
          } else if (disposition === 'release' && !(await heldElsewhere(tx, batchId, after.id))) {
            await setBatchStatus(tx, actor, batchId, 'released', 'disposition', why);
          }
          // Rework and re-inspection keep the batch on hold until that work is recorded and QA releases it.
        }
      },
    },
    notifyInvestigatorAssigned: {
      async inTransaction(tx, { actor, after }) {
        await mailTo(tx, await activeUsers(tx, [after.investigatorId]), actor, after, {
          key: 'deviation-assigned',
          template: 'deviation_assigned',
          subject: `Deviation ${label(after)} assigned to you for investigation`,
          heading: `You are investigating ${label(after)}`,
          paragraphs: [
            `${actor.name} opened the investigation of deviation ${label(after)}: ${after.title}.`,
            after.classification
              ? `Classification: ${classificationLabels[after.classification]}.` +
                (after.dueAt ? ` Due ${after.dueAt.toISOString().slice(0, 10)}.` : '')
              : 'No classification has been recorded yet.',
          ],
          footer: 'You receive this because you are the assigned investigator.',
        });
      },
    },
    notifyApprovalRequested: {
      async inTransaction(tx, { actor, after }) {
        const approvers = await tx
          .select({ id: users.id, email: users.email })
          .from(users)
          .where(and(eq(users.active, true), eq(users.role, 'qa_approver')));
        // Segregation of duties: the author and the investigator may not approve, so they are not asked.
        const eligible = approvers.filter((a) => a.id !== after.raisedBy && a.id !== after.investigatorId);
        await mailTo(tx, eligible, actor, after, {
          key: 'deviation-approval',
          template: 'deviation_approval_requested',
          subject: `Deviation ${label(after)} awaits approval`,
          heading: `${label(after)} awaits approval`,
          paragraphs: [
            `${actor.name} completed the investigation of ${label(after)}: ${after.title}, and signed it.`,
            'Read the report and the batch dispositions, then approve it or return it for rework.',
          ],
          footer: 'You receive this because you are a QA approver in Plumbline.',
        });
      },
    },
    notifyReturnedForRework: {
      async inTransaction(tx, { actor, after }) {
        await mailTo(tx, await activeUsers(tx, [after.investigatorId]), actor, after, {
          key: 'deviation-returned',
          template: 'deviation_returned',
          subject: `Deviation ${label(after)} returned for rework`,
          heading: `${label(after)} returned for rework`,
          paragraphs: [`${actor.name} returned the investigation of ${label(after)}: ${after.title}.`, 'Read the comment in the timeline.'],
          footer: 'You receive this because you are the assigned investigator.',
        });
      },
    },
    notifyClosed: {
      async inTransaction(tx, { actor, after }) {
        await mailTo(tx, await activeUsers(tx, [after.raisedBy, after.investigatorId]), actor, after, {
          key: 'deviation-closed',
          template: 'deviation_closed',
          subject: `Deviation ${label(after)} closed`,
          heading: `${label(after)} closed`,
          paragraphs: [
            `${actor.name} approved and closed deviation ${label(after)}: ${after.title}.`,
            'Each held batch has taken its disposition; see the deviation for the details.',
          ],
          footer: 'You receive this because you raised or investigated this deviation.',
        });
      },
    },
  },
});
