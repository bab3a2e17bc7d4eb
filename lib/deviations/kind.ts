import 'server-only';
import { and, asc, eq, inArray, ne, notInArray, or } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { batches, deviationBatches, deviations } from '../../db/schema';
import { deviationGuardRefusals, deviationMachine } from '../../workflows/deviation';
import type { DeviationState } from '../../workflows/states';
import { type Notice, type Recipient, activeUsers, activeUsersWithRole, sendNotice } from '../mail/record-notice';
import { batchKind } from '../master-data/batch-kind';
import { type EvidenceDigest, listEvidenceDigests } from '../records/facts';
import { type RecordActor, defineRecordKind, independentPeople } from '../records/kind';
import { writeConsequence } from '../records/write-path';
import { type Classification, type Disposition, classificationLabels, deviationEventLabels, deviationStateLabels } from './labels';

/*
 * Deviations on the write path: who sees one (a draft, and a discarded draft, are their author's
 * alone), who edits which section in which state, who may not approve, close, return or cancel it
 * (whoever raised or investigated it), what each signature covers, and the effects of its events.
 * Nothing else in the product restates these rules.
 */

export type DeviationRow = typeof deviations.$inferSelect;

/** States in which a deviation still holds its batches. */
export const openDeviationStates = ['reported', 'triage', 'investigation', 'approval'] as const satisfies readonly DeviationState[];

/** States that are the author's alone: nobody else is told such a record exists. */
const privateStates = ['draft', 'discarded'] as const satisfies readonly DeviationState[];

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

export interface HeldBatchFact {
  batchId: number;
  lotNumber: string;
  batchStatus: (typeof batches.$inferSelect)['status'];
  onHold: boolean;
  recommendedDisposition: Disposition | null;
  disposition: Disposition | null;
  dispositionNote: string | null;
  samplingPlan: string | null;
}

/** What the deviation's rules read beyond its row: the batches it holds and the files on it. */
export interface DeviationFacts {
  held: HeldBatchFact[];
  evidence: EvidenceDigest[];
}

async function deviationFacts(dbOrTx: Parameters<typeof listEvidenceDigests>[0], row: DeviationRow): Promise<DeviationFacts> {
  const [held, evidence] = await Promise.all([
    dbOrTx
      .select({
        batchId: deviationBatches.batchId,
        lotNumber: batches.lotNumber,
        batchStatus: batches.status,
        onHold: deviationBatches.onHold,
        recommendedDisposition: deviationBatches.recommendedDisposition,
        disposition: deviationBatches.disposition,
        dispositionNote: deviationBatches.dispositionNote,
        samplingPlan: deviationBatches.samplingPlan,
      })
      .from(deviationBatches)
      .innerJoin(batches, eq(batches.id, deviationBatches.batchId))
      .where(eq(deviationBatches.deviationId, row.id))
      .orderBy(asc(deviationBatches.batchId)),
    listEvidenceDigests(dbOrTx, 'deviation', row.id),
  ]);
  return { held, evidence };
}

const heldNow = (facts: DeviationFacts) => facts.held.filter((h) => h.onHold);

/** "Every held batch needs a disposition …; BW-2611-03 has none …", or null when none is missing. */
function undisposedRefusal(facts: DeviationFacts): string | null {
  const open = heldNow(facts).filter((h) => h.disposition === null);
  if (open.length === 0) return null;
  const lots = open.map((h) => h.lotNumber).join(', ');
  return `Every held batch needs a disposition before the deviation closes; ${lots} ${open.length === 1 ? 'has' : 'have'} none. Record it under "Held batches".`;
}

/*
 * What each signature vouches for (21 CFR 11.70: a signature is linked to the record it signs). The
 * investigator's "investigation complete" covers the report as raised, the triage, the
 * investigation, the dispositions they recommend and every file's SHA-256; the approver's
 * "approved" (approval, closing as minor, cancelling) covers all of that plus the final
 * dispositions and the closing words. The lifecycle state and times are left out: a later step
 * moves them without changing what was signed.
 */
const signedParts = {
  report: (row: DeviationRow, facts: DeviationFacts) => ({
    number: row.number,
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
    occurredAt: row.occurredAt,
    heldBatchIds: heldNow(facts).map((h) => h.batchId),
  }),
  triage: (row: DeviationRow) => ({
    classification: row.classification,
    classificationReason: row.classificationReason,
    severity: row.severity,
    occurrence: row.occurrence,
    detection: row.detection,
    rpn: row.rpn,
    investigatorId: row.investigatorId,
    dueAt: row.dueAt,
  }),
  investigation: (row: DeviationRow) => ({
    investigationReport: row.investigationReport,
    fiveWhys: row.fiveWhys,
    causeAnalysis: row.causeAnalysis,
    rootCauseCategory: row.rootCauseCategory,
    rootCause: row.rootCause,
    productImpact: row.productImpact,
    capaRequired: row.capaRequired,
  }),
  recommendations: (facts: DeviationFacts) => heldNow(facts).map((h) => ({ batchId: h.batchId, recommended: h.recommendedDisposition })),
  dispositions: (facts: DeviationFacts) =>
    heldNow(facts).map((h) => ({ batchId: h.batchId, disposition: h.disposition, note: h.dispositionNote, samplingPlan: h.samplingPlan })),
  evidence: (facts: DeviationFacts) => facts.evidence,
};

const label = (row: DeviationRow) => row.number ?? `draft #${row.id}`;

/** Puts a batch on hold, releases or rejects it as a consequence of this deviation (audited on the batch). */
export async function setBatchStatus(
  tx: Tx,
  actor: RecordActor,
  batchId: number,
  status: (typeof batches.$inferSelect)['status'],
  action: string,
  reason: string,
): Promise<void> {
  await writeConsequence(tx, batchKind, batchId, {
    actor,
    action,
    reason,
    changes: (batch) => (batch.status === status ? null : { status }),
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

function notice(tx: Tx, after: DeviationRow, recipients: Recipient[], actor: RecordActor, n: Notice) {
  return sendNotice(
    tx,
    { recordType: 'deviation', id: after.id, version: after.version, label: label(after), path: `/deviations/${after.id}`, linkLabel: 'Open the deviation' },
    recipients,
    actor,
    n,
  );
}

/** States in which evidence may still be added: up to the decision (ALCOA+ contemporaneous). */
const evidenceStates = ['draft', ...openDeviationStates] as const;
const investigatorOnly = {
  of: (row: DeviationRow) => [row.investigatorId],
} as const;

export const deviationKind = defineRecordKind({
  recordType: 'deviation',
  noun: 'deviation',
  table: deviations,
  machine: deviationMachine,
  readPermission: 'deviation.read',
  owners: (t) => [t.raisedBy],
  // A draft is its author's notebook until submitted, and a discarded one stays that.
  visibleTo: (actor, row) => !(privateStates as readonly string[]).includes(row.status) || row.raisedBy === actor.id,
  visibleWhere: (actor) => or(notInArray(deviations.status, [...privateStates]), eq(deviations.raisedBy, actor.id)),
  related: deviationFacts,
  context: (row, facts) => ({
    raisedBy: row.raisedBy,
    investigatorId: row.investigatorId,
    classification: row.classification,
    heldBatchesWithoutDisposition: heldNow(facts).filter((h) => h.disposition === null).length,
  }),
  eventPermissions: {
    submit: 'deviation.edit_draft',
    discard: 'deviation.edit_draft',
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
  guardRefusals: {
    ...deviationGuardRefusals,
    // 21 CFR 211.192: the investigation extends to every batch that may be affected; name the ones still open.
    byApproverWithBatchesDisposed: (_row, facts) => undisposedRefusal(facts) ?? deviationGuardRefusals.byApproverWithBatchesDisposed,
    minorByApproverWithBatchesDisposed: (row, facts) =>
      row.classification === 'minor' ? (undisposedRefusal(facts) ?? deviationGuardRefusals.minorByApproverWithBatchesDisposed) : 'Only a deviation classified minor can be closed at triage.',
  },
  participants: {
    author: { did: 'raised this deviation', of: (row) => [row.raisedBy] },
    investigator: { did: 'investigated this deviation', of: (row) => [row.investigatorId] },
  },
  // A second person's judgement is the point of these steps (21 CFR 211.22(a), 211.192).
  independence: {
    approve: ['author', 'investigator'],
    close_minor: ['author', 'investigator'],
    return_for_rework: ['author', 'investigator'],
    cancel: ['author', 'investigator'],
  },
  sections: {
    draft: { label: 'Editing the draft', permission: 'deviation.edit_draft', states: ['draft'] },
    holds: { label: 'Extending the holds', permission: 'deviation.triage', states: ['reported', 'triage'] },
    triage: { label: 'Recording the triage', permission: 'deviation.triage', states: ['triage'] },
    // One named author answers for the report they sign (common practice).
    investigation: {
      label: 'Editing the investigation',
      permission: 'deviation.investigate',
      states: ['investigation'],
      holders: { ...investigatorOnly, refusal: 'Only the investigator assigned to this deviation edits its investigation.' },
    },
    recommendation: {
      label: 'Recommending a disposition',
      permission: 'deviation.investigate',
      states: ['investigation'],
      holders: { ...investigatorOnly, refusal: 'Only the investigator assigned to this deviation recommends the dispositions of its batches.' },
    },
    // Releasing or rejecting a batch is the quality unit's decision (21 CFR 211.22(a)), by a second person.
    disposition: {
      label: 'Deciding a batch’s disposition',
      permission: 'deviation.approve',
      states: ['triage', 'approval'],
      independentOf: ['author', 'investigator'],
      condition: {
        holds: (row) => row.status !== 'triage' || row.classification === 'minor',
        refusal: 'At triage only a deviation classified minor (to be closed there) takes dispositions; the others get them through the investigation.',
      },
    },
    evidence: {
      label: 'Adding evidence',
      permission: 'attachment.add',
      states: evidenceStates,
      stateRefusal: 'Evidence can no longer be added once a deviation is closed or cancelled. Add a comment or raise a new record.',
      ownScope: { of: (row) => [row.raisedBy], refusal: 'Only the person who raised this deviation and QA can add evidence to it.' },
    },
    comments: { label: 'Commenting', permission: 'deviation.read', states: 'any', bumpsVersion: false },
  },
  signedContent: {
    investigation_complete: (row, facts) => ({
      report: signedParts.report(row, facts),
      triage: signedParts.triage(row),
      investigation: signedParts.investigation(row),
      recommendations: signedParts.recommendations(facts),
      evidence: signedParts.evidence(facts),
    }),
    approved: (row, facts) => ({
      report: signedParts.report(row, facts),
      triage: signedParts.triage(row),
      investigation: signedParts.investigation(row),
      recommendations: signedParts.recommendations(facts),
      dispositions: signedParts.dispositions(facts),
      closure: { closureJustification: row.closureJustification, cancelReason: row.cancelReason },
      evidence: signedParts.evidence(facts),
    }),
  },
  signedPartLabels: {
    report: 'the report as raised',
    triage: 'the triage',
    investigation: 'the investigation',
    recommendations: 'the recommended dispositions',
    dispositions: 'the batch dispositions',
    closure: 'the closing justification',
    evidence: 'the evidence files',
  },
  auditFields: deviationAuditFields,
  toDto: toDeviationDto,
  effects: {
    holdBatches: {
      async inTransaction(tx, { actor, after }) {
        const held = await tx
          .select({ batchId: deviationBatches.batchId, status: batches.status })
          .from(deviationBatches)
          .innerJoin(batches, eq(batches.id, deviationBatches.batchId))
          .where(and(eq(deviationBatches.deviationId, after.id), eq(deviationBatches.onHold, true)))
          // In id order, so two deviations holding the same batches queue instead of deadlocking.
          .orderBy(asc(deviationBatches.batchId));
        for (const { batchId, status } of held) {
          // A rejected batch is already out of the supply chain; a hold would only hide that decision.
          if (status === 'rejected') continue;
          await setBatchStatus(tx, actor, batchId, 'on_hold', 'hold', `Put on hold by deviation ${label(after)}`);
        }
      },
    },
    applyDispositions: {
      async inTransaction(tx, { actor, after }) {
        const held = await tx
          .select({ batchId: deviationBatches.batchId, disposition: deviationBatches.disposition })
          .from(deviationBatches)
          .where(and(eq(deviationBatches.deviationId, after.id), eq(deviationBatches.onHold, true)))
          .orderBy(asc(deviationBatches.batchId));
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
        await notice(tx, after, await activeUsers(tx, [after.investigatorId]), actor, {
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
        // Only the approvers who may approve it (segregation of duties) are asked.
        const facts = await deviationFacts(tx, after);
        const eligible = independentPeople(deviationKind, after, facts, 'approve', await activeUsersWithRole(tx, ['qa_approver']));
        await notice(tx, after, eligible, actor, {
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
        await notice(tx, after, await activeUsers(tx, [after.investigatorId]), actor, {
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
        await notice(tx, after, await activeUsers(tx, [after.raisedBy, after.investigatorId]), actor, {
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
