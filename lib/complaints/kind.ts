import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import type { DbOrTx, Tx } from '../../db/client';
import { complaints, recordLinks } from '../../db/schema';
import { complaintGuardRefusals, complaintMachine } from '../../workflows/complaint';
import type { ComplaintState } from '../../workflows/states';
import type { RegulatoryClockKind } from '../clocks/regulatory';
import { type Notice, type Recipient, activeUsers, activeUsersWithRole, sendNotice } from '../mail/record-notice';
import { type EvidenceDigest, type SignerFact, editorsOf, listEvidenceDigests, listSigners } from '../records/facts';
import { type RecordActor, defineRecordKind, independentPeople } from '../records/kind';
import { isRichTextEmpty } from '../rich-text/sanitize';
import { type ComplainantKind, type IntakeChannel, complaintEventLabels, complaintStateLabels, qualityDefectPossible } from './labels';

/*
 * Complaints on the write path: who sees one (an operator, the ones they took down), who edits which
 * section in which state, who may not close it (whoever took it down, owns it, decided its
 * reportability, signed its investigation, or wrote or sent the answer), what each signature
 * covers, and mail. Nothing else in the product restates these rules.
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

/** What the complaint's rules read beyond its row: its links, who signed it, who wrote the answer, its files. */
export interface ComplaintFacts {
  links: { toType: string; toId: number; relation: string }[];
  signers: SignerFact[];
  /** Everyone who saved a version of the letter. */
  responseWriters: number[];
  evidence: EvidenceDigest[];
}

/** The audit actions that write the letter (lib/complaints/commands.ts). */
export const responseWritingActions = ['write_response'] as const;

async function complaintFacts(dbOrTx: DbOrTx, row: ComplaintRow): Promise<ComplaintFacts> {
  const [links, signers, responseWriters, evidence] = await Promise.all([
    dbOrTx
      .select({ toType: recordLinks.toType, toId: recordLinks.toId, relation: recordLinks.relation })
      .from(recordLinks)
      .where(and(eq(recordLinks.fromType, 'complaint'), eq(recordLinks.fromId, row.id)))
      .orderBy(asc(recordLinks.id)),
    listSigners(dbOrTx, 'complaint', row.id),
    editorsOf(dbOrTx, 'complaint', row.id, responseWritingActions),
    listEvidenceDigests(dbOrTx, 'complaint', row.id),
  ]);
  return { links, signers, responseWriters, evidence };
}

const signersWith = (facts: ComplaintFacts, meaning: string) => facts.signers.filter((s) => s.meaning === meaning).map((s) => s.userId);

/*
 * What a complaint signature vouches for (21 CFR 11.70): the reportability decision covers the
 * complaint as received and the assessment; "investigation complete" adds the investigation (samples,
 * summary, linked records) and every file's SHA-256; the closing approval adds the answer as sent.
 * Personal data is covered too: only its hash is kept with the signature. Lifecycle times and the
 * report's submission date (which may follow the closing) are left out.
 */
const signedParts = {
  intake: (row: ComplaintRow) => ({
    number: row.number,
    receivedOn: row.receivedOn,
    channel: row.channel,
    complainantName: row.complainantName,
    complainantContact: row.complainantContact,
    complainantKind: row.complainantKind,
    productId: row.productId,
    batchId: row.batchId,
    lotAsReported: row.lotAsReported,
    description: row.description,
    unitsAffected: row.unitsAffected,
    personHarmed: row.personHarmed,
    harmDescription: row.harmDescription,
    samplesReturning: row.samplesReturning,
  }),
  assessment: (row: ComplaintRow) => ({
    category: row.category,
    adverseEvent: row.adverseEvent,
    seriousAdverseEvent: row.seriousAdverseEvent,
    reportable: row.reportable,
    reportKind: row.reportKind,
    reportDueOn: row.reportDueOn,
    assessmentRationale: row.assessmentRationale,
    investigationSkipReason: row.investigationSkipReason,
  }),
  investigation: (row: ComplaintRow, facts: ComplaintFacts) => ({
    retainedSamplesChecked: row.retainedSamplesChecked,
    retainedSamplesNote: row.retainedSamplesNote,
    investigationSummary: row.investigationSummary,
    links: facts.links,
  }),
  response: (row: ComplaintRow) => ({ responseChannel: row.responseChannel, responseSentText: row.responseSentText }),
};

/** States in which the complaint still takes evidence. */
const openStates = ['received', 'assessment', 'investigation', 'response'] as const satisfies readonly ComplaintState[];

export function isAssessmentRecorded(row: ComplaintRow): boolean {
  if (!row.category || row.adverseEvent === null || row.reportable === null || !row.assessmentRationale?.trim()) return false;
  if (row.adverseEvent && row.seriousAdverseEvent === null) return false;
  return !row.reportable || (row.reportKind !== null && row.reportDueOn !== null);
}

export function isInvestigationRecorded(row: ComplaintRow): boolean {
  return row.retainedSamplesChecked !== null && Boolean(row.investigationSummary?.trim());
}

/*
 * Notices to staff name the record, never the complainant: a mailbox is not the place for personal
 * data, and the link leads to the page, which shows it to those allowed to see it.
 */
export function complaintNotice(tx: Tx, row: Pick<ComplaintRow, 'id' | 'number' | 'version'>, recipients: readonly Recipient[], actor: RecordActor, n: Notice) {
  return sendNotice(
    tx,
    { recordType: 'complaint', id: row.id, version: row.version, label: row.number, path: `/complaints/${row.id}`, linkLabel: 'Open the complaint' },
    recipients,
    actor,
    n,
  );
}

/** QA approvers who may close this complaint (segregation of duties), to be told it can be closed. */
export async function eligibleClosers(tx: DbOrTx, row: ComplaintRow): Promise<Recipient[]> {
  return independentPeople(complaintKind, row, await complaintFacts(tx, row), 'close', await activeUsersWithRole(tx, ['qa_approver']));
}

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
  owners: (t) => [t.createdBy, t.ownerId],
  related: complaintFacts,
  context: (row) => ({
    ownerId: row.ownerId,
    assessmentRecorded: isAssessmentRecorded(row),
    qualityDefectPossible: qualityDefectPossible(row.category),
    investigationRecorded: isInvestigationRecorded(row),
    responseSent: row.responseSentAt !== null,
  }),
  participants: {
    intake: { did: 'took this complaint down', of: (row) => [row.createdBy] },
    owner: { did: 'own this complaint', of: (row) => [row.ownerId] },
    decider: { did: 'decided its reportability', of: (row, facts) => [row.reportabilityDecidedBy, ...signersWith(facts, 'reportability_decided')] },
    investigationSigner: { did: 'signed its investigation', of: (_row, facts) => signersWith(facts, 'investigation_complete') },
    responder: { did: 'wrote or sent its answer', of: (row, facts) => [row.responseSentBy, ...facts.responseWriters] },
  },
  // The closing approval is a second person's review of the whole file (21 CFR 211.198(a); EU GMP Chapter 8).
  independence: { close: ['intake', 'owner', 'decider', 'investigationSigner', 'responder'] },
  sections: {
    assessment: { label: 'Recording the assessment', permission: 'complaint.assess', states: ['assessment'] },
    investigation: { label: 'Recording the investigation', permission: 'complaint.assess', states: ['investigation'] },
    links: { label: 'Linking a record', permission: 'complaint.assess', states: ['investigation'] },
    response: {
      label: 'Writing the answer',
      permission: 'complaint.respond',
      states: ['response'],
      condition: { holds: (row) => row.responseSentAt === null, refusal: 'The answer has already been sent; it stays on record as it went out.' },
    },
    report: {
      label: 'Recording the report',
      permission: 'complaint.respond',
      states: ['investigation', 'response', 'closed'],
      condition: { holds: (row) => row.reportable === true, refusal: 'This complaint was assessed as not reportable.' },
    },
    evidence: {
      label: 'Adding evidence',
      permission: 'attachment.add',
      states: openStates,
      stateRefusal: 'This complaint is closed; evidence can no longer be added. Reopen it if new evidence arrives.',
      ownScope: { of: (row) => [row.createdBy, row.ownerId], refusal: 'Only the person who took this complaint down and QA can add evidence to it.' },
    },
    comments: { label: 'Commenting', permission: 'complaint.read', states: 'any', bumpsVersion: false },
  },
  signedContent: {
    reportability_decided: (row) => ({ intake: signedParts.intake(row), assessment: signedParts.assessment(row) }),
    investigation_complete: (row, facts) => ({
      intake: signedParts.intake(row),
      assessment: signedParts.assessment(row),
      investigation: signedParts.investigation(row, facts),
      evidence: facts.evidence,
    }),
    approved: (row, facts) => ({
      intake: signedParts.intake(row),
      assessment: signedParts.assessment(row),
      investigation: signedParts.investigation(row, facts),
      response: signedParts.response(row),
      evidence: facts.evidence,
    }),
  },
  signedPartLabels: {
    intake: 'the complaint as received',
    assessment: 'the assessment',
    investigation: 'the investigation',
    response: 'the answer as sent',
    evidence: 'the evidence files',
  },
  auditFields: complaintAuditFields,
  toDto: toComplaintDto,
  effects: {
    notifyQaOfNewComplaint: {
      async inTransaction(tx, { actor, after }) {
        await complaintNotice(tx, after, await activeUsersWithRole(tx, ['qa_investigator']), actor, {
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
        await complaintNotice(tx, after, await activeUsers(tx, [after.ownerId]), actor, {
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
