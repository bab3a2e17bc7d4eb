import 'server-only';
import { and, asc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { db, type DbOrTx } from '../../db/client';
import { batches, capsuleDefects, fillingRings, machines, products, users } from '../../db/schema';
import { can } from '../auth/permissions';
import type { AllowedEvent } from '../records/workflow';
import { type BlockedEvent, type RecordAbilities, type RecordActor, type SectionOf, abilitiesOf } from '../records/kind';
import { getVisibleRow, loadRelated, signedContentOf } from '../records/write-path';
import { userIdsInChanges } from '../records/timeline';
import { type AuditEntryDto, type HistoryEntryDto, listAuditTrail, listStateHistory } from '../records/trail';
import { type SignatureDto, listSignatures } from '../signatures';
import { type DeviationEventType, deviationEvents } from '../../workflows/deviation';
import { parseInput } from '../validation/parse';
import {
  type DeviationOutcome,
  approveDeviation,
  assignInvestigation,
  cancelDeviation,
  closeMinor,
  discardDraft,
  returnForRework,
  startTriage,
  submitDeviation,
  submitForApproval,
} from './commands';
import { type DeviationDto, type HeldBatchFact, deviationKind } from './kind';
import type { Classification, Disposition } from './labels';

/*
 * Everything the deviation page shows, as one DTO: the record, what it points at (defect, product,
 * batch, machine, ring, people), the batches it holds with their dispositions, and its story
 * (history, signatures, and the audit trail for the roles that may read it).
 */

/** A batch the deviation holds or held, with its disposition: the kind's fact as the page shows it. */
export type HeldBatchDto = HeldBatchFact;

export interface DeviationDefectDto {
  id: number;
  code: string;
  name: string;
  defaultClassification: Classification;
  defaultSeverity: number;
  caution: string | null;
}

export interface DeviationDetailDto {
  deviation: DeviationDto;
  defect: DeviationDefectDto | null;
  product: { id: number; code: string; name: string; strength: string } | null;
  lotNumber: string | null;
  machine: { id: number; name: string; assetTag: string } | null;
  ring: { id: number; serial: string } | null;
  raisedByName: string;
  ownerName: string | null;
  investigatorName: string | null;
  heldBatches: HeldBatchDto[];
  allowedEvents: AllowedEvent<DeviationEventType>[];
  /** Events this person's role sends now but this deviation refuses them, with the reason (segregation of duties, a guard). */
  blockedEvents: BlockedEvent<DeviationEventType>[];
  /** Which sections this person may edit now, and why not. */
  sections: RecordAbilities<DeviationEventType, SectionOf<typeof deviationKind>>['sections'];
  history: HistoryEntryDto[];
  signatures: SignatureDto[];
  /** Null for roles without audit.read. */
  audit: AuditEntryDto[] | null;
  /** Names of the people the audit changes name by id (owner, investigator), keyed by user id. */
  userNames: Record<number, string>;
}

/** One query for every user id the audit trail mentions, so the timeline shows names, not numbers. */
async function userNamesFor(dbOrTx: DbOrTx, ids: number[]): Promise<Record<number, string>> {
  if (ids.length === 0) return {};
  const rows = await dbOrTx.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids));
  return Object.fromEntries(rows.map((r) => [r.id, r.name]));
}

async function userName(dbOrTx: DbOrTx, id: number | null): Promise<string | null> {
  if (id === null) return null;
  const [row] = await dbOrTx.select({ name: users.name }).from(users).where(eq(users.id, id));
  return row?.name ?? null;
}

/** Someone else's draft is reported as missing, exactly like a record that does not exist. */
export async function getDeviationDetail(id: number, viewer: RecordActor, dbOrTx: DbOrTx = db): Promise<DeviationDetailDto> {
  const row = await getVisibleRow(dbOrTx, deviationKind, id, viewer);
  const facts = await loadRelated(deviationKind, dbOrTx, row);

  const [defect, product, batch, machine, ring, raisedByName, ownerName, investigatorName, history, signatures, audit] =
    await Promise.all([
      row.defectId === null
        ? null
        : dbOrTx
            .select({
              id: capsuleDefects.id,
              code: capsuleDefects.code,
              name: capsuleDefects.name,
              defaultClassification: capsuleDefects.defaultClassification,
              defaultSeverity: capsuleDefects.defaultSeverity,
              caution: capsuleDefects.caution,
            })
            .from(capsuleDefects)
            .where(eq(capsuleDefects.id, row.defectId))
            .then((r) => r[0] ?? null),
      row.productId === null
        ? null
        : dbOrTx
            .select({ id: products.id, code: products.code, name: products.name, strength: products.strength })
            .from(products)
            .where(eq(products.id, row.productId))
            .then((r) => r[0] ?? null),
      row.batchId === null
        ? null
        : dbOrTx
            .select({ lotNumber: batches.lotNumber })
            .from(batches)
            .where(eq(batches.id, row.batchId))
            .then((r) => r[0] ?? null),
      row.machineId === null
        ? null
        : dbOrTx
            .select({ id: machines.id, name: machines.name, assetTag: machines.assetTag })
            .from(machines)
            .where(eq(machines.id, row.machineId))
            .then((r) => r[0] ?? null),
      row.ringId === null
        ? null
        : dbOrTx
            .select({ id: fillingRings.id, serial: fillingRings.serial })
            .from(fillingRings)
            .where(eq(fillingRings.id, row.ringId))
            .then((r) => r[0] ?? null),
      userName(dbOrTx, row.raisedBy),
      userName(dbOrTx, row.ownerId),
      userName(dbOrTx, row.investigatorId),
      listStateHistory(dbOrTx, deviationKind, row.id),
      listSignatures(dbOrTx, 'deviation', row.id, (meaning) => signedContentOf(deviationKind, meaning, row, facts), deviationKind.signedPartLabels),
      can(viewer, 'audit.read') ? listAuditTrail(dbOrTx, 'deviation', row.id) : Promise.resolve(null),
    ]);

  return {
    deviation: deviationKind.toDto(row),
    defect,
    product,
    lotNumber: batch?.lotNumber ?? null,
    machine,
    ring,
    raisedByName: raisedByName ?? 'Unknown user',
    ownerName,
    investigatorName,
    // The same rows the rules read (the kind's facts), shown by lot number.
    heldBatches: [...facts.held].sort((a, b) => a.lotNumber.localeCompare(b.lotNumber)),
    ...abilitiesOf(deviationKind, viewer, row, facts),
    history,
    signatures,
    audit,
    userNames: await userNamesFor(dbOrTx, userIdsInChanges(audit)),
  };
}

export interface InvestigatorOptionDto {
  id: number;
  name: string;
}

/** Who may be assigned an investigation: active QA investigators (the command checks the same). */
export async function listActiveInvestigators(dbOrTx: DbOrTx = db): Promise<InvestigatorOptionDto[]> {
  return dbOrTx
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(and(eq(users.role, 'qa_investigator'), eq(users.active, true)))
    .orderBy(asc(users.name));
}

/** What the detail page's forms and POST /api/deviations/[id] send: one lifecycle event. */
export const deviationEventRequestSchema = z.object({
  event: z.enum(deviationEvents, { error: 'Unknown event for a deviation.' }),
  version: z.coerce.number({ error: 'Reload the page and try again.' }).int().positive(),
  reason: z.string().optional(),
  password: z.string().optional(),
});
export type DeviationEventRequest = z.input<typeof deviationEventRequestSchema>;

/**
 * Sends one event to the command that performs it. Each command parses what its event needs
 * (reason, password) and runs the write path, so role, record, version and guards are checked there.
 */
export async function sendDeviationEvent(actor: RecordActor, id: number, raw: unknown): Promise<DeviationOutcome> {
  const { event, version, reason, password } = parseInput(deviationEventRequestSchema, raw);
  switch (event) {
    case 'submit':
      return submitDeviation(actor, { id, version });
    case 'discard':
      return discardDraft(actor, { id, version, reason: reason ?? null });
    case 'start_triage':
      return startTriage(actor, { id, version });
    case 'assign_investigation':
      return assignInvestigation(actor, { id, version });
    case 'submit_for_approval':
      return submitForApproval(actor, { id, version, password: password ?? '' });
    case 'return_for_rework':
      return returnForRework(actor, { id, version, reason: reason ?? '' });
    case 'approve':
      return approveDeviation(actor, { id, version, password: password ?? '' });
    case 'close_minor':
      return closeMinor(actor, { id, version, reason: reason ?? '', password: password ?? '' });
    case 'cancel':
      return cancelDeviation(actor, { id, version, reason: reason ?? '', password: password ?? '' });
  }
}
