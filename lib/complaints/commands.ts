import 'server-only';
import { and, eq } from 'drizzle-orm';
import { batches, capas, capsuleDefects, deviations, products, recordLinks } from '../../db/schema';
import { assertCan } from '../auth/permissions';
import { insertCapa } from '../capa/commands';
import { now as clockNow } from '../clock';
import { addBusinessDays } from '../clocks/business-days';
import { todayIn } from '../clocks/dates';
import { getEnv } from '../env';
import { ValidationError } from '../errors';
import { assertCandidate } from '../users/candidates';
import { enqueueMail } from '../mail/outbox';
import type { RecordActor } from '../records/kind';
import { type SignOptions, type WriteOutcome, createRecord, editRecord, transitionRecord } from '../records/write-path';
import { cleanRichTextForSaving, isRichTextEmpty, richTextToPlainText } from '../rich-text/sanitize';
import { getBusinessCalendar, getSiteTimeZone } from '../site-calendar/queries';
import { parseInput } from '../validation/parse';
import { reportDueOn } from './deadline';
import { complaintKind, complaintNotice, eligibleClosers, responseWritingActions } from './kind';
import { complaintLinkRelations, isNonDefectCategory, reportKindFor } from './labels';
import { isEmailAddress, placeholderPattern, responseMail } from './letter';
import {
  type AssessmentInput,
  type IntakeInput,
  type InvestigationInput,
  type LinkInput,
  type RaiseCapaInput,
  type ReopenInput,
  type ReportSubmittedInput,
  type ResponseDraftInput,
  type SendResponseInput,
  type SignedInput,
  type SignedReasonInput,
  type VersionInput,
  assessmentSchema,
  intakeSchema,
  investigationSchema,
  linkSchema,
  raiseCapaSchema,
  reopenSchema,
  reportSubmittedSchema,
  responseDraftSchema,
  sendResponseSchema,
  signedReasonSchema,
  signedSchema,
  versionSchema,
} from './schemas';

/*
 * Complaint commands: what each event and each section edit (assessment, investigation, links,
 * letter, report) changes. Who may do it and when are the record kind's rules
 * (lib/complaints/kind.ts), checked by the write path on the locked row; every edit is audited field
 * by field (21 CFR 11.10(e)) and bumps the version, so a decision someone is signing cannot change
 * under them unnoticed.
 */

export type ComplaintOutcome = WriteOutcome<typeof complaintKind>;

/** Internal target for closing a complaint, in site business days from receipt (common practice). */
export const complaintDueBusinessDays = 30;

function refuse(fieldErrors: Record<string, string[]>): never {
  const first = Object.values(fieldErrors).flat()[0] ?? 'Check the highlighted fields.';
  throw new ValidationError(Object.keys(fieldErrors).length === 1 ? first : 'Check the highlighted fields.', fieldErrors);
}

/**
 * The complaint as taken down: who complained and how to reach them, the product and the lot (a lot
 * found in the batch records fills product and batch; one that is not is kept as reported and
 * flagged), what they found, whether someone was harmed, and whether samples are coming back. The
 * received date may not be in the future at the site, nor before the lot was made.
 */
export async function createComplaint(actor: RecordActor, raw: IntakeInput, now: Date = clockNow()): Promise<ComplaintOutcome> {
  const input = parseInput(intakeSchema, raw);
  return createRecord(complaintKind, actor, 'complaint.intake', async (tx) => {
    const today = todayIn(await getSiteTimeZone(tx), now);
    const errors: Record<string, string[]> = {};
    if (input.receivedOn > today) errors.receivedOn = [`The date received cannot be in the future (it is ${today} at the site).`];

    const [batch] = input.lot
      ? await tx
          .select({ id: batches.id, lot: batches.lotNumber, productId: batches.productId, manufacturedOn: batches.manufacturedOn, product: products.name })
          .from(batches)
          .innerJoin(products, eq(products.id, batches.productId))
          .where(eq(batches.lotNumber, input.lot))
      : [];
    let productId = input.productId ?? null;
    if (batch) {
      if (productId !== null && productId !== batch.productId) {
        errors.productId = [`Lot ${batch.lot} is ${batch.product}. Pick that product, or check the lot with the caller.`];
      }
      productId = batch.productId;
      if (input.receivedOn < batch.manufacturedOn) {
        errors.receivedOn = [`Lot ${batch.lot} was made on ${batch.manufacturedOn}; a complaint about it cannot have been received before that.`];
      }
    } else if (productId === null) {
      errors.productId = [input.lot ? `Lot ${input.lot} is not in the batch records: pick the product the caller named.` : 'Pick the product.'];
    } else {
      const [product] = await tx.select({ id: products.id }).from(products).where(eq(products.id, productId));
      if (!product) errors.productId = ['Pick the product from the list.'];
    }
    if (Object.keys(errors).length > 0) refuse(errors);

    const calendar = await getBusinessCalendar(input.receivedOn, 120, tx);
    const due = addBusinessDays(input.receivedOn, complaintDueBusinessDays, calendar);
    return {
      number: { type: 'complaint' },
      values: {
        receivedOn: input.receivedOn,
        channel: input.channel,
        complainantName: input.complainantName,
        complainantContact: input.complainantContact,
        complainantKind: input.complainantKind,
        productId,
        batchId: batch?.id ?? null,
        lotAsReported: input.lot ?? null,
        lotUnknown: !batch,
        description: input.description,
        unitsAffected: input.unitsAffected ?? null,
        personHarmed: input.personHarmed,
        harmDescription: input.personHarmed ? (input.harmDescription ?? null) : null,
        samplesReturning: input.samplesReturning,
        ownerId: null,
        createdBy: actor.id,
        dueAt: new Date(`${due}T00:00:00.000Z`),
      },
    };
  });
}

/** A QA investigator takes the complaint on and becomes its owner. */
export async function startAssessment(actor: RecordActor, raw: VersionInput): Promise<ComplaintOutcome> {
  const input = parseInput(versionSchema, raw);
  return transitionRecord(complaintKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'start_assessment',
    actor,
    changes: () => ({ ownerId: actor.id }),
  });
}

/**
 * The assessment: category from the catalogue (a capsule defect or a non-defect category), whether
 * it is an adverse event and whether that is serious, and whether it must be reported, with the
 * deadline from the clocks module counted from the received date. A serious adverse event with a
 * dietary supplement must be reported (21 U.S.C. 379aa-1(b)(1)); the report kind follows from the
 * product's class, never from the form.
 */
export async function saveAssessment(actor: RecordActor, raw: AssessmentInput): Promise<ComplaintOutcome> {
  const input = parseInput(assessmentSchema, raw);
  return editRecord(complaintKind, {
    id: input.id,
    section: 'assessment',
    actor,
    expectedVersion: input.version,
    action: 'record_assessment',
    async apply(before, { tx }) {
      const errors: Record<string, string[]> = {};
      let defectId: number | null = null;
      if (!isNonDefectCategory(input.category)) {
        const [defect] = await tx
          .select({ id: capsuleDefects.id })
          .from(capsuleDefects)
          .where(and(eq(capsuleDefects.code, input.category), eq(capsuleDefects.active, true)));
        if (defect) defectId = defect.id;
        else errors.category = ['Pick a category from the list.'];
      }
      const [product] = before.productId
        ? await tx.select({ regulatoryClass: products.regulatoryClass, name: products.name }).from(products).where(eq(products.id, before.productId))
        : [];
      if (!product) throw new ValidationError('This complaint names no product; it cannot be assessed for reporting.');
      const serious = input.adverseEvent ? input.seriousAdverseEvent === true : false;
      const kind = reportKindFor[product.regulatoryClass];
      if (product.regulatoryClass === 'supplement') {
        if (serious && !input.reportable) {
          errors.reportable = [
            `A serious adverse event with a dietary supplement (${product.name}) must be reported to FDA within 15 business days (21 U.S.C. 379aa-1(b)(1)).`,
          ];
        }
        if (!serious && input.reportable) {
          errors.reportable = ['For a dietary supplement only a serious adverse event is reported under 21 U.S.C. 379aa-1; record it as serious, or as not reportable.'];
        }
      }
      if (Object.keys(errors).length > 0) refuse(errors);
      return {
        changes: {
          category: input.category,
          defectId,
          adverseEvent: input.adverseEvent,
          seriousAdverseEvent: input.adverseEvent ? serious : false,
          reportable: input.reportable,
          reportKind: input.reportable ? kind : null,
          reportDueOn: input.reportable ? reportDueOn(kind, before.receivedOn) : null,
          assessmentRationale: input.assessmentRationale,
        },
      };
    },
  });
}

/** The assessing QA investigator signs the reportability decision ("reportability decided"). */
export async function completeAssessment(actor: RecordActor, raw: SignedInput, options: SignOptions = {}): Promise<ComplaintOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(complaintKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'complete_assessment',
    actor,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ reportabilityDecidedAt: now, reportabilityDecidedBy: actor.id, investigationSkipReason: null }),
  });
}

/** No quality defect is possible: straight to the answer, with the justification signed (21 CFR 211.198(b)(2)). */
export async function skipInvestigation(actor: RecordActor, raw: SignedReasonInput, options: SignOptions = {}): Promise<ComplaintOutcome> {
  const input = parseInput(signedReasonSchema, raw);
  return transitionRecord(complaintKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'skip_investigation',
    actor,
    reason: input.reason,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ reportabilityDecidedAt: now, reportabilityDecidedBy: actor.id, investigationSkipReason: input.reason }),
  });
}

/** Retained samples checked (yes/no, with a note) and the summary of what was found. */
export async function saveInvestigation(actor: RecordActor, raw: InvestigationInput): Promise<ComplaintOutcome> {
  const input = parseInput(investigationSchema, raw);
  return editRecord(complaintKind, {
    id: input.id,
    section: 'investigation',
    actor,
    expectedVersion: input.version,
    action: 'record_investigation',
    apply: () => ({
      changes: {
        retainedSamplesChecked: input.retainedSamplesChecked ?? null,
        retainedSamplesNote: input.retainedSamplesNote ?? null,
        investigationSummary: input.investigationSummary ?? null,
      },
    }),
  });
}

const recordNumberPattern = /^(DEV|CAPA)-\d{4}-\d{4,}$/i;

/** Links the complaint to an existing deviation or CAPA, named by its number (audited on the complaint). */
export async function linkRecord(actor: RecordActor, raw: LinkInput): Promise<ComplaintOutcome> {
  const input = parseInput(linkSchema, raw);
  return editRecord(complaintKind, {
    id: input.id,
    section: 'links',
    actor,
    expectedVersion: input.version,
    action: `link_${input.target}`,
    async apply(before, { tx }) {
      const reference = input.reference.toUpperCase();
      const example = input.target === 'deviation' ? 'DEV-2026-0042' : 'CAPA-2026-0007';
      if (!recordNumberPattern.test(reference) || !reference.startsWith(input.target === 'deviation' ? 'DEV-' : 'CAPA-')) {
        refuse({ reference: [`Enter a ${input.target === 'deviation' ? 'deviation' : 'CAPA'} number like ${example}.`] });
      }
      const [target] =
        input.target === 'deviation'
          ? await tx.select({ id: deviations.id }).from(deviations).where(eq(deviations.number, reference))
          : await tx.select({ id: capas.id }).from(capas).where(eq(capas.number, reference));
      if (!target) refuse({ reference: [`No ${input.target === 'deviation' ? 'deviation' : 'CAPA'} has the number ${reference}.`] });
      const relation = input.target === 'deviation' ? complaintLinkRelations.deviation : complaintLinkRelations.capa;
      const existing = await tx
        .select({ id: recordLinks.id })
        .from(recordLinks)
        .where(and(eq(recordLinks.fromType, 'complaint'), eq(recordLinks.fromId, before.id), eq(recordLinks.toType, input.target), eq(recordLinks.toId, target!.id)));
      if (existing.length > 0) refuse({ reference: [`${reference} is already linked to this complaint.`] });
      await tx.insert(recordLinks).values({ fromType: 'complaint', fromId: before.id, toType: input.target, toId: target!.id, relation, createdBy: actor.id });
      return { audit: [{ field: `linked ${input.target}`, from: null, to: reference }] };
    },
  });
}

/**
 * Raises a CAPA from the complaint through the CAPA's own insert path (number, history, audit, the
 * owner's notice, the link back to the complaint), and notes it on the complaint.
 */
export async function raiseCapaFromComplaint(actor: RecordActor, raw: RaiseCapaInput): Promise<ComplaintOutcome & { capa: { id: number; number: string } }> {
  const input = parseInput(raiseCapaSchema, raw);
  const outcome = await editRecord(complaintKind, {
    id: input.id,
    section: 'links',
    actor,
    expectedVersion: input.version,
    action: 'raise_capa',
    async apply(before, { tx }) {
      // After the complaint's own checks (a complaint this person may not see stays missing).
      assertCan(actor, 'capa.create');
      await assertCandidate(tx, input.ownerId, { roles: ['qa_investigator'] }, { field: 'ownerId', message: 'Pick an active QA investigator as the CAPA owner.' });
      const created = await insertCapa(
        tx,
        actor,
        { title: input.title, sourceType: 'complaint', sourceId: before.id, problemStatement: input.problemStatement, rootCause: null, ownerId: input.ownerId },
        `Raised from the investigation of complaint ${before.number}.`,
      );
      return {
        audit: [{ field: 'raised CAPA', from: null, to: created.row.number }],
        result: { id: created.row.id, number: created.row.number },
        afterCommit: created.afterCommit,
      };
    },
  });
  return { ...outcome, capa: outcome.result! };
}

/** The investigator signs the investigation ("investigation complete"). */
export async function completeInvestigation(actor: RecordActor, raw: SignedInput, options: SignOptions = {}): Promise<ComplaintOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(complaintKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'complete_investigation',
    actor,
    password: input.password,
    signer: options.signer,
  });
}

/** The letter being written, cleaned on the server (lib/rich-text/sanitize.ts). */
export async function saveResponseDraft(actor: RecordActor, raw: ResponseDraftInput): Promise<ComplaintOutcome> {
  const input = parseInput(responseDraftSchema, raw);
  const cleaned = cleanRichTextForSaving(input.letter);
  if (!cleaned.ok) refuse({ letter: [cleaned.message] });
  return editRecord(complaintKind, {
    id: input.id,
    section: 'response',
    actor,
    expectedVersion: input.version,
    // lib/complaints/kind.ts counts everyone who made this edit as a writer of the answer.
    action: responseWritingActions[0],
    apply: () => ({ changes: { responseText: cleaned.empty ? null : cleaned.html } }),
  });
}

/**
 * Sends the saved letter: by e-mail through the outbox to the complainant's address (in the same
 * transaction, so it goes out if and only if this commits), or recorded as sent by post. The letter
 * as sent is kept with the record (21 CFR 211.198(b)(3): the reply to the complainant is part of
 * the complaint file); QA approvers are told it can be closed.
 */
export async function sendResponse(actor: RecordActor, raw: SendResponseInput): Promise<ComplaintOutcome> {
  const input = parseInput(sendResponseSchema, raw);
  return editRecord(complaintKind, {
    id: input.id,
    section: 'response',
    actor,
    expectedVersion: input.version,
    action: 'send_response',
    async apply(before, { tx, now }) {
      const letter = before.responseText ?? '';
      if (isRichTextEmpty(letter)) refuse({ letter: ['Write and save the letter before sending it.'] });
      const text = richTextToPlainText(letter);
      if (placeholderPattern.test(text)) refuse({ letter: ['The letter still holds a [bracketed] note from the template: replace it before sending.'] });
      if (input.channel === 'email') {
        if (!isEmailAddress(before.complainantContact)) {
          refuse({ channel: ['The contact on record is not an e-mail address: send the letter by post and record it here.'] });
        }
        const env = getEnv();
        const mail = responseMail({ siteName: env.SITE_NAME, number: before.number, letterHtml: letter, letterText: text });
        await enqueueMail(tx, {
          dedupeKey: `complaint-response:${before.id}:v${before.version}`,
          template: 'complaint_response',
          to: { address: before.complainantContact!.trim() },
          subject: mail.subject,
          text: mail.text,
          html: mail.html,
          recordType: 'complaint',
          recordId: before.id,
        });
      }
      const sent = { responseChannel: input.channel, responseSentText: letter, responseSentAt: now, responseSentBy: actor.id };
      const after = { ...before, ...sent, version: before.version + 1 };
      // Only the approvers who may close it are told: not whoever wrote or sent the answer (lib/complaints/kind.ts).
      await complaintNotice(tx, after, await eligibleClosers(tx, after), actor, {
        key: 'complaint-answered',
        template: 'complaint_answered',
        subject: `Complaint ${before.number}: answered, ready to close`,
        heading: `${before.number} answered`,
        paragraphs: [`${actor.name} sent the answer ${input.channel === 'email' ? 'by e-mail' : 'by post'}. Review the record and close it with your signature.`],
        footer: 'You receive this because you are a QA approver who may close this complaint.',
      });
      return { changes: sent };
    },
  });
}

/** A QA approver closes the answered complaint ("approved"). */
export async function closeComplaint(actor: RecordActor, raw: SignedInput, options: SignOptions = {}): Promise<ComplaintOutcome> {
  const input = parseInput(signedSchema, raw);
  return transitionRecord(complaintKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'close',
    actor,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ closedAt: now }),
  });
}

/**
 * Reopens a closed complaint to the assessment or the investigation, with the reason. The earlier
 * decision and letter stay in the audit trail; the step reopened must be done and signed again, and
 * a new answer sent before it closes again.
 */
export async function reopenComplaint(actor: RecordActor, raw: ReopenInput): Promise<ComplaintOutcome> {
  const input = parseInput(reopenSchema, raw);
  return transitionRecord(complaintKind, {
    id: input.id,
    expectedVersion: input.version,
    event: input.to === 'assessment' ? 'reopen_assessment' : 'reopen_investigation',
    actor,
    reason: input.reason,
    changes: () => ({
      reopenReason: input.reason,
      closedAt: null,
      responseChannel: null,
      responseSentAt: null,
      responseSentBy: null,
      responseSentText: null,
      ...(input.to === 'assessment' ? { reportabilityDecidedAt: null, reportabilityDecidedBy: null } : {}),
      investigationSkipReason: null,
    }),
  });
}

/** The date the report went to the regulator; stops the countdown. */
export async function recordReportSubmitted(actor: RecordActor, raw: ReportSubmittedInput, now: Date = clockNow()): Promise<ComplaintOutcome> {
  const input = parseInput(reportSubmittedSchema, raw);
  return editRecord(complaintKind, {
    id: input.id,
    section: 'report',
    actor,
    expectedVersion: input.version,
    action: 'record_report_submitted',
    async apply(before, { tx }) {
      const today = todayIn(await getSiteTimeZone(tx), now);
      if (input.submittedOn > today) refuse({ submittedOn: [`The date cannot be in the future (it is ${today} at the site).`] });
      if (input.submittedOn < before.receivedOn) refuse({ submittedOn: [`The complaint was received on ${before.receivedOn}; the report cannot be earlier.`] });
      return { changes: { reportSubmittedAt: new Date(`${input.submittedOn}T00:00:00.000Z`) } };
    },
  });
}
