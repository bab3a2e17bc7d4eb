import 'server-only';
import { and, eq, inArray } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { complaints, users } from '../../db/schema';
import { complaintGuardRefusals, complaintMachine } from '../../workflows/complaint';
import type { ComplaintState } from '../../workflows/states';
import type { RegulatoryClockKind } from '../clocks/regulatory';
import { getEnv } from '../env';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import { type RecordActor, defineRecordKind } from '../records/kind';
import { isRichTextEmpty } from '../rich-text/sanitize';
import { type ComplainantKind, type IntakeChannel, complaintEventLabels, complaintStateLabels, qualityDefectPossible } from './labels';

/*
 * Complaints on the write path: their table, machine, permissions, signed content and mail.
 *
 * Personal data (the complainant's name and contact, how a person was harmed, and the letter, which
 * is addressed to them) never enters ComplaintDto: the DTO is what the write path hands back to any
 * caller, whatever their role. Only lib/complaints/detail.ts adds it, for complaint.read_personal.
 */

export type ComplaintRow = typeof complaints.$inferSelect;

/** Columns holding personal data; their values are left out of every DTO and audit view without complaint.read_personal. */
export const personalFields = ['complainantName', 'complainantContact', 'harmDescription', 'responseText', 'responseSentText'] as const satisfies readonly (keyof ComplaintRow)[];

export interface ComplaintDto {
  id: number;
  number: string;
  status: ComplaintState;
  version: number;
  receivedOn: string;
  channel: IntakeChannel;
  complainantKind: ComplainantKind;
  productId: number | null;
  batchId: number | null;
  lotAsReported: string | null;
  lotUnknown: boolean;
  description: string;
  unitsAffected: number | null;
  personHarmed: boolean;
  samplesReturning: boolean;
  category: string | null;
  defectId: number | null;
  adverseEvent: boolean | null;
  seriousAdverseEvent: boolean | null;
  reportable: boolean | null;
  reportKind: RegulatoryClockKind | null;
  reportDueOn: string | null;
  reportSubmittedAt: string | null;
  assessmentRationale: string | null;
  reportabilityDecidedAt: string | null;
  reportabilityDecidedBy: number | null;
  investigationSkipReason: string | null;
  retainedSamplesChecked: boolean | null;
  retainedSamplesNote: string | null;
  investigationSummary: string | null;
  /** Whether a letter is being written (its text is personal data). */
  hasResponseDraft: boolean;
  responseChannel: 'email' | 'post' | null;
  responseSentAt: string | null;
  responseSentBy: number | null;
  reopenReason: string | null;
  ownerId: number | null;
  createdBy: number;
  /** ISO 8601, UTC. */
  dueAt: string | null;
  closedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

const iso = (d: Date | null) => d?.toISOString() ?? null;

export function toComplaintDto(row: ComplaintRow): ComplaintDto {
  return {
    id: row.id,
    number: row.number,
    status: row.status,
    version: row.version,
    receivedOn: row.receivedOn,
    channel: row.channel as IntakeChannel,
    complainantKind: row.complainantKind as ComplainantKind,
    productId: row.productId,
    batchId: row.batchId,
    lotAsReported: row.lotAsReported,
    lotUnknown: row.lotUnknown,
    description: row.description,
    unitsAffected: row.unitsAffected,
    personHarmed: row.personHarmed,
    samplesReturning: row.samplesReturning,
    category: row.category,
    defectId: row.defectId,
    adverseEvent: row.adverseEvent,
    seriousAdverseEvent: row.seriousAdverseEvent,
    reportable: row.reportable,
    reportKind: row.reportKind as RegulatoryClockKind | null,
    reportDueOn: row.reportDueOn,
    reportSubmittedAt: iso(row.reportSubmittedAt),
    assessmentRationale: row.assessmentRationale,
    reportabilityDecidedAt: iso(row.reportabilityDecidedAt),
    reportabilityDecidedBy: row.reportabilityDecidedBy,
    investigationSkipReason: row.investigationSkipReason,
    retainedSamplesChecked: row.retainedSamplesChecked,
    retainedSamplesNote: row.retainedSamplesNote,
    investigationSummary: row.investigationSummary,
    hasResponseDraft: Boolean(row.responseText && !isRichTextEmpty(row.responseText)),
    responseChannel: row.responseChannel,
    responseSentAt: iso(row.responseSentAt),
    responseSentBy: row.responseSentBy,
    reopenReason: row.reopenReason,
    ownerId: row.ownerId,
    createdBy: row.createdBy,
    dueAt: iso(row.dueAt),
    closedAt: iso(row.closedAt),
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** Columns whose every change is audited (21 CFR 11.10(e)); the personal ones are hidden when read back. */
export const complaintAuditFields = [
  'receivedOn',
  'channel',
  'complainantName',
  'complainantContact',
  'complainantKind',
  'productId',
  'batchId',
  'lotAsReported',
  'lotUnknown',
  'description',
  'unitsAffected',
  'personHarmed',
  'harmDescription',
  'samplesReturning',
  'category',
  'defectId',
  'adverseEvent',
  'seriousAdverseEvent',
  'reportable',
  'reportKind',
  'reportDueOn',
  'reportSubmittedAt',
  'assessmentRationale',
  'reportabilityDecidedAt',
  'reportabilityDecidedBy',
  'investigationSkipReason',
  'retainedSamplesChecked',
  'retainedSamplesNote',
  'investigationSummary',
  'responseText',
  'responseChannel',
  'responseSentText',
  'responseSentAt',
  'responseSentBy',
  'reopenReason',
  'ownerId',
  'dueAt',
  'closedAt',
] as const satisfies readonly (keyof ComplaintRow)[];

/*
 * What a complaint signature vouches for: the facts as received and the assessment (category,
 * adverse event, seriousness, reportability and its deadline, rationale). The investigation and the
 * letter are written after the assessment is signed; binding them here would make that earlier
 * signature read as "changed after signing" (21 CFR 11.70). They are kept, field by field, in the
 * audit trail of the transition each later signature belongs to.
 */
export function complaintSignedContent(row: ComplaintRow): Record<string, unknown> {
  return {
    number: row.number,
    receivedOn: row.receivedOn,
    productId: row.productId,
    batchId: row.batchId,
    lotAsReported: row.lotAsReported,
    description: row.description,
    unitsAffected: row.unitsAffected,
    personHarmed: row.personHarmed,
    category: row.category,
    adverseEvent: row.adverseEvent,
    seriousAdverseEvent: row.seriousAdverseEvent,
    reportable: row.reportable,
    reportKind: row.reportKind,
    reportDueOn: row.reportDueOn,
    assessmentRationale: row.assessmentRationale,
  };
}

export function isAssessmentRecorded(row: ComplaintRow): boolean {
  if (!row.category || row.adverseEvent === null || row.reportable === null || !row.assessmentRationale?.trim()) return false;
  if (row.adverseEvent && row.seriousAdverseEvent === null) return false;
  return !row.reportable || (row.reportKind !== null && row.reportDueOn !== null);
}

export function isInvestigationRecorded(row: ComplaintRow): boolean {
  return row.retainedSamplesChecked !== null && Boolean(row.investigationSummary?.trim());
}

export interface Recipient {
  id: number;
  email: string;
}

async function activeUsersWith(tx: Tx, where: { ids?: (number | null)[]; role?: 'qa_investigator' | 'qa_approver' }): Promise<Recipient[]> {
  const ids = (where.ids ?? []).filter((i): i is number => i !== null);
  if (where.ids && ids.length === 0) return [];
  return tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(eq(users.active, true), where.role ? eq(users.role, where.role) : undefined, where.ids ? inArray(users.id, ids) : undefined));
}

/*
 * Notices to staff name the record, never the complainant: a mailbox is not the place for personal
 * data, and the link leads to the page, which shows it to those allowed to see it.
 */
export async function mailStaffAboutComplaint(
  tx: Tx,
  recipients: Recipient[],
  actor: RecordActor,
  row: Pick<ComplaintRow, 'id' | 'number' | 'version'>,
  m: { key: string; template: string; subject: string; heading: string; paragraphs: string[]; footer: string },
): Promise<void> {
  const env = getEnv();
  const mail = renderMailLayout({
    siteName: env.SITE_NAME,
    recordNumber: row.number,
    heading: m.heading,
    paragraphs: m.paragraphs,
    link: { url: new URL(`/complaints/${row.id}`, env.APP_URL).toString(), label: 'Open the complaint' },
    footer: m.footer,
  });
  const seen = new Set<number>();
  for (const r of recipients) {
    if (r.id === actor.id || seen.has(r.id)) continue;
    seen.add(r.id);
    await enqueueMail(tx, {
      dedupeKey: `${m.key}:${row.id}:v${row.version}:${r.id}`,
      template: m.template,
      to: { address: r.email, userId: r.id },
      subject: m.subject,
      text: mail.text,
      html: mail.html,
      recordType: 'complaint',
      recordId: row.id,
    });
  }
}

export { activeUsersWith };

export const complaintKind = defineRecordKind({
  recordType: 'complaint',
  noun: 'complaint',
  table: complaints,
  machine: complaintMachine,
  readPermission: 'complaint.read',
  eventPermissions: {
    start_assessment: 'complaint.assess',
    complete_assessment: 'complaint.assess',
    skip_investigation: 'complaint.assess',
    complete_investigation: 'complaint.assess',
    close: 'complaint.approve',
    reopen_assessment: 'complaint.reopen',
    reopen_investigation: 'complaint.reopen',
  },
  eventLabels: complaintEventLabels,
  stateLabels: complaintStateLabels,
  guardRefusals: complaintGuardRefusals,
  // 'own' for an operator: the complaints they entered.
  ownerIds: (row) => [row.createdBy, row.ownerId],
  context: (row) => ({
    ownerId: row.ownerId,
    assessmentRecorded: isAssessmentRecorded(row),
    qualityDefectPossible: qualityDefectPossible(row.category),
    investigationRecorded: isInvestigationRecorded(row),
    responseSent: row.responseSentAt !== null,
  }),
  signedContent: complaintSignedContent,
  auditFields: complaintAuditFields,
  toDto: toComplaintDto,
  effects: {
    notifyQaOfNewComplaint: {
      async inTransaction(tx, { actor, after }) {
        await mailStaffAboutComplaint(tx, await activeUsersWith(tx, { role: 'qa_investigator' }), actor, after, {
          key: 'complaint-received',
          template: 'complaint_received',
          subject: `New complaint ${after.number}`,
          heading: `Complaint ${after.number} received`,
          paragraphs: [
            `${actor.name} took down a complaint received on ${after.receivedOn}${after.lotAsReported ? `, lot ${after.lotAsReported}` : ''}${after.lotUnknown ? ' (lot not found in the batch records)' : ''}.`,
            after.personHarmed ? 'A person was harmed: assess it today; a report to the regulator may be due within days.' : 'Start the assessment.',
          ],
          footer: 'You receive this because you are a QA investigator.',
        });
      },
    },
    notifyOwnerReopened: {
      async inTransaction(tx, { actor, after }) {
        await mailStaffAboutComplaint(tx, await activeUsersWith(tx, { ids: [after.ownerId] }), actor, after, {
          key: 'complaint-reopened',
          template: 'complaint_reopened',
          subject: `Complaint ${after.number} reopened`,
          heading: `${after.number} reopened`,
          paragraphs: [`${actor.name} reopened ${after.number} for ${complaintStateLabels[after.status].toLowerCase()}.`, after.reopenReason ? `Reason: ${after.reopenReason}` : ''].filter(Boolean),
          footer: 'You receive this because you own this complaint.',
        });
      },
    },
  },
});
