import 'server-only';
import { and, asc, eq, inArray } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { batches, capas, capsuleDefects, deviations, fillingRings, machines, products, recordLinks, users } from '../../db/schema';
import type { ComplaintEventType } from '../../workflows/complaint';
import { can } from '../auth/permissions';
import { roleLabels } from '../auth/roles';
import { isoDateOfInstant, todayIn } from '../clocks/dates';
import { type DeviationRowDto, listDeviations } from '../deviations/queries';
import { getEnv } from '../env';
import { type BlockedEvent, type RecordActor, abilitiesOf, ownerIdsOf } from '../records/kind';
import { getVisibleRow, loadRelated, signedContentOf } from '../records/write-path';
import { userIdsInChanges } from '../records/timeline';
import { type AuditEntryDto, type HistoryEntryDto, listAuditTrail, listStateHistory } from '../records/trail';
import { sanitizeRichText } from '../rich-text/sanitize';
import { type SignatureDto, listSignatures } from '../signatures';
import { getSiteTimeZone } from '../site-calendar/queries';
import { parseDeviationListQuery } from '../validation/deviation-list';
import { parseInput } from '../validation/parse';
import type { AllowedEvent } from '../records/workflow';
import {
  type ComplaintOutcome,
  closeComplaint,
  completeAssessment,
  completeInvestigation,
  reopenComplaint,
  skipInvestigation,
  startAssessment,
} from './commands';
import { type ReportCountdown, reportCountdown } from './deadline';
import { type ComplaintDto, complaintKind, personalFields } from './kind';
import { draftLetterHtml } from './letter';
import { categoryLabel } from './queries';
import { complaintEventRequestSchema } from './schemas';

/*
 * Everything the complaint page shows, as one DTO: the record, what it points at (product, batch,
 * machine, ring), the deviations of the same lot, filler and ring beside the investigation, the
 * linked deviations and CAPAs, what this person may do now, and the story (history, signatures, the
 * audit trail for the roles that may read it).
 *
 * Personal data (name, contact, harm, the letter) is in `personal`, and only for complaint.read_personal;
 * for everyone else `personal` is null and the audit trail shows those fields as hidden, so no page,
 * route or export built on this DTO can leak it.
 */

export interface ComplaintPersonalDto {
  complainantName: string | null;
  complainantContact: string | null;
  harmDescription: string | null;
  /** The letter being written (cleaned HTML), or a first draft from the template. */
  letterDraft: string;
  letterSent: string | null;
}

export interface LinkedRecordDto {
  type: 'deviation' | 'capa';
  id: number;
  number: string;
  title: string;
  status: string;
  relation: string;
  href: string;
}

export interface ComplaintDetailDto {
  complaint: ComplaintDto;
  personal: ComplaintPersonalDto | null;
  product: { id: number; code: string; name: string; strength: string; regulatoryClass: 'supplement' | 'drug' } | null;
  batch: {
    id: number;
    lotNumber: string;
    manufacturedOn: string;
    status: string;
    unitsShipped: number;
    machine: { id: number; assetTag: string; name: string } | null;
    ring: { id: number; serial: string } | null;
  } | null;
  categoryLabel: string | null;
  report: ReportCountdown | null;
  ownerName: string | null;
  createdByName: string;
  decidedByName: string | null;
  sentByName: string | null;
  links: LinkedRecordDto[];
  /** Deviations of the same lot, filler and ring, newest first (null when the lot is unknown or the viewer may not read deviations). */
  batchDeviations: { sameLot: DeviationRowDto[]; sameMachine: DeviationRowDto[]; sameRing: DeviationRowDto[] } | null;
  allowedEvents: AllowedEvent<ComplaintEventType>[];
  /** Events this person's role sends now but this complaint refuses them, with the reason (segregation of duties, a guard). */
  blockedEvents: BlockedEvent<ComplaintEventType>[];
  can: { assess: boolean; investigate: boolean; respond: boolean; recordReport: boolean; raiseCapa: boolean; addEvidence: boolean };
  history: HistoryEntryDto[];
  signatures: SignatureDto[];
  audit: AuditEntryDto[] | null;
  userNames: Record<number, string>;
}

export const hiddenValue = '(personal data, hidden)';

/** The audit trail with personal values hidden, for viewers without complaint.read_personal. */
export function hidePersonalData(audit: AuditEntryDto[]): AuditEntryDto[] {
  const hidden: readonly string[] = personalFields;
  const mask = (v: unknown) => (v === null || v === undefined || v === '' ? v : hiddenValue);
  return audit.map((e) => ({
    ...e,
    changes: e.changes.map((c) => (hidden.includes(c.field) ? { ...c, from: mask(c.from), to: mask(c.to) } : c)),
  }));
}

async function namesOf(dbOrTx: DbOrTx, ids: (number | null)[]): Promise<Record<number, string>> {
  const wanted = [...new Set(ids.filter((i): i is number => i !== null))];
  if (wanted.length === 0) return {};
  const rows = await dbOrTx.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, wanted));
  return Object.fromEntries(rows.map((r) => [r.id, r.name]));
}

export async function listComplaintLinks(dbOrTx: DbOrTx, complaintId: number): Promise<LinkedRecordDto[]> {
  const links = await dbOrTx
    .select({ toType: recordLinks.toType, toId: recordLinks.toId, relation: recordLinks.relation })
    .from(recordLinks)
    .where(and(eq(recordLinks.fromType, 'complaint'), eq(recordLinks.fromId, complaintId)))
    .orderBy(asc(recordLinks.id));
  const deviationIds = links.filter((l) => l.toType === 'deviation').map((l) => l.toId);
  const capaIds = links.filter((l) => l.toType === 'capa').map((l) => l.toId);
  const [devs, caps] = await Promise.all([
    deviationIds.length
      ? dbOrTx.select({ id: deviations.id, number: deviations.number, title: deviations.title, status: deviations.status }).from(deviations).where(inArray(deviations.id, deviationIds))
      : Promise.resolve([]),
    capaIds.length ? dbOrTx.select({ id: capas.id, number: capas.number, title: capas.title, status: capas.status }).from(capas).where(inArray(capas.id, capaIds)) : Promise.resolve([]),
  ]);
  return links.flatMap((l): LinkedRecordDto[] => {
    if (l.toType === 'deviation') {
      const d = devs.find((x) => x.id === l.toId);
      return d ? [{ type: 'deviation', id: d.id, number: d.number ?? `#${d.id}`, title: d.title, status: d.status, relation: l.relation, href: `/deviations/${d.id}` }] : [];
    }
    if (l.toType === 'capa') {
      const c = caps.find((x) => x.id === l.toId);
      return c ? [{ type: 'capa', id: c.id, number: c.number, title: c.title, status: c.status, relation: l.relation, href: `/capa/${c.id}` }] : [];
    }
    return [];
  });
}

async function deviationsBeside(
  viewer: RecordActor,
  batch: NonNullable<ComplaintDetailDto['batch']>,
): Promise<NonNullable<ComplaintDetailDto['batchDeviations']>> {
  const page = (params: Record<string, string>) => listDeviations(parseDeviationListQuery({ pageSize: '10', ...params }), viewer).then((p) => p.rows);
  const [sameLot, sameMachine, sameRing] = await Promise.all([
    page({ lot: batch.lotNumber }),
    batch.machine ? page({ machineId: String(batch.machine.id) }) : Promise.resolve([]),
    batch.ring ? page({ ringId: String(batch.ring.id) }) : Promise.resolve([]),
  ]);
  return { sameLot, sameMachine, sameRing };
}

export async function getComplaintDetail(id: number, viewer: RecordActor, dbOrTx: DbOrTx = db, now: Date = new Date()): Promise<ComplaintDetailDto> {
  const row = await getVisibleRow(dbOrTx, complaintKind, id, viewer);
  const facts = await loadRelated(complaintKind, dbOrTx, row);
  const { allowedEvents, blockedEvents, sections } = abilitiesOf(complaintKind, viewer, row, facts);

  const [productRow] = row.productId
    ? await dbOrTx
        .select({ id: products.id, code: products.code, name: products.name, strength: products.strength, regulatoryClass: products.regulatoryClass })
        .from(products)
        .where(eq(products.id, row.productId))
    : [];
  const [batchRow] = row.batchId
    ? await dbOrTx
        .select({
          id: batches.id,
          lotNumber: batches.lotNumber,
          manufacturedOn: batches.manufacturedOn,
          status: batches.status,
          unitsShipped: batches.unitsShipped,
          machineId: machines.id,
          assetTag: machines.assetTag,
          machineName: machines.name,
          ringId: fillingRings.id,
          serial: fillingRings.serial,
        })
        .from(batches)
        .leftJoin(machines, eq(machines.id, batches.machineId))
        .leftJoin(fillingRings, eq(fillingRings.id, batches.ringId))
        .where(eq(batches.id, row.batchId))
    : [];
  const batch = batchRow
    ? {
        id: batchRow.id,
        lotNumber: batchRow.lotNumber,
        manufacturedOn: batchRow.manufacturedOn,
        status: batchRow.status,
        unitsShipped: batchRow.unitsShipped,
        machine: batchRow.machineId ? { id: batchRow.machineId, assetTag: batchRow.assetTag!, name: batchRow.machineName! } : null,
        ring: batchRow.ringId ? { id: batchRow.ringId, serial: batchRow.serial! } : null,
      }
    : null;
  const [defect] = row.defectId ? await dbOrTx.select({ name: capsuleDefects.name }).from(capsuleDefects).where(eq(capsuleDefects.id, row.defectId)) : [];

  const mayReadPersonal = can(viewer, 'complaint.read_personal', { ownerIds: ownerIdsOf(complaintKind, row) });
  const showInvestigation = row.status !== 'received' && row.status !== 'assessment';
  const [links, history, signatures, rawAudit, batchDeviations, timeZone] = await Promise.all([
    listComplaintLinks(dbOrTx, row.id),
    listStateHistory(dbOrTx, complaintKind, row.id),
    listSignatures(dbOrTx, 'complaint', row.id, (meaning) => signedContentOf(complaintKind, meaning, row, facts), complaintKind.signedPartLabels),
    can(viewer, 'audit.read') ? listAuditTrail(dbOrTx, 'complaint', row.id) : Promise.resolve(null),
    batch && showInvestigation && can(viewer, 'deviation.read') ? deviationsBeside(viewer, batch) : Promise.resolve(null),
    getSiteTimeZone(dbOrTx),
  ]);
  const audit = rawAudit && !mayReadPersonal ? hidePersonalData(rawAudit) : rawAudit;
  const names = await namesOf(dbOrTx, [row.ownerId, row.createdBy, row.reportabilityDecidedBy, row.responseSentBy, ...userIdsInChanges(audit)]);

  let personal: ComplaintPersonalDto | null = null;
  if (mayReadPersonal) {
    const [me] = await dbOrTx.select({ title: users.title }).from(users).where(eq(users.id, viewer.id));
    personal = {
      complainantName: row.complainantName,
      complainantContact: row.complainantContact,
      harmDescription: row.harmDescription,
      letterDraft: row.responseText
        ? sanitizeRichText(row.responseText)
        : draftLetterHtml({
            siteName: getEnv().SITE_NAME,
            number: row.number,
            complainantName: row.complainantName ?? 'customer',
            receivedOn: row.receivedOn,
            product: productRow ? `${productRow.name} ${productRow.strength}` : null,
            lot: batch?.lotNumber ?? row.lotAsReported,
            reported: row.description,
            found: row.investigationSummary ?? row.investigationSkipReason,
            signerName: viewer.name,
            signerTitle: me?.title || roleLabels[viewer.role],
          }),
      letterSent: row.responseSentText ? sanitizeRichText(row.responseSentText) : null,
    };
  }

  const today = todayIn(timeZone, now);
  return {
    complaint: complaintKind.toDto(row),
    personal,
    product: productRow ?? null,
    batch,
    categoryLabel: categoryLabel(row.category, defect?.name ?? null),
    report:
      row.reportable && row.reportDueOn
        ? reportCountdown(row.reportDueOn, today, row.reportSubmittedAt ? isoDateOfInstant(row.reportSubmittedAt) : null)
        : null,
    ownerName: row.ownerId ? (names[row.ownerId] ?? null) : null,
    createdByName: names[row.createdBy] ?? 'Unknown user',
    decidedByName: row.reportabilityDecidedBy ? (names[row.reportabilityDecidedBy] ?? null) : null,
    sentByName: row.responseSentBy ? (names[row.responseSentBy] ?? null) : null,
    links,
    batchDeviations,
    allowedEvents,
    blockedEvents,
    // Each form is offered exactly when the complaint's rules (lib/complaints/kind.ts) accept it.
    can: {
      assess: sections.assessment.editable,
      investigate: sections.investigation.editable,
      raiseCapa: sections.links.editable && can(viewer, 'capa.create'),
      // The letter is personal data: only those who may read it write it.
      respond: sections.response.editable && mayReadPersonal,
      recordReport: sections.report.editable && row.reportSubmittedAt === null,
      addEvidence: sections.evidence.editable,
    },
    history,
    signatures,
    audit,
    userNames: names,
  };
}

/**
 * Sends one lifecycle event to the command that performs it. Each command parses what its event
 * needs and runs the write path, so role, record, version and guards are checked there.
 */
export async function sendComplaintEvent(actor: RecordActor, id: number, raw: unknown): Promise<ComplaintOutcome> {
  const { event, version, reason, password } = parseInput(complaintEventRequestSchema, raw);
  switch (event) {
    case 'start_assessment':
      return startAssessment(actor, { id, version });
    case 'complete_assessment':
      return completeAssessment(actor, { id, version, password: password ?? '' });
    case 'skip_investigation':
      return skipInvestigation(actor, { id, version, reason: reason ?? '', password: password ?? '' });
    case 'complete_investigation':
      return completeInvestigation(actor, { id, version, password: password ?? '' });
    case 'close':
      return closeComplaint(actor, { id, version, password: password ?? '' });
    case 'reopen_assessment':
      return reopenComplaint(actor, { id, version, reason: reason ?? '', to: 'assessment' });
    case 'reopen_investigation':
      return reopenComplaint(actor, { id, version, reason: reason ?? '', to: 'investigation' });
  }
}

/** QA investigators who may own a CAPA raised from a complaint. */
export async function listCapaOwnerOptions(dbOrTx: DbOrTx = db): Promise<{ id: number; label: string }[]> {
  const rows = await dbOrTx
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(and(eq(users.role, 'qa_investigator'), eq(users.active, true)))
    .orderBy(asc(users.name));
  return rows.map((u) => ({ id: u.id, label: u.name }));
}
