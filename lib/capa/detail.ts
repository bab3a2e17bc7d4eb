import 'server-only';
import { and, asc, eq, inArray, ne } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import {  capas, capsuleDefects, complaints, deviations, fillingRings, machines, users } from '../../db/schema';
import type { CapaEventType } from '../../workflows/capa';
import { can } from '../auth/permissions';
import { type BlockedEvent, type RecordAbilities, type RecordActor, type SectionOf, abilitiesOf, checkSection } from '../records/kind';
import { getVisibleRow, loadRelated, signedContentOf } from '../records/write-path';
import { userIdsInChanges } from '../records/timeline';
import { type AuditEntryDto, type HistoryEntryDto, listAuditTrail, listStateHistory } from '../records/trail';
import type { AllowedEvent } from '../records/workflow';
import { type SignatureDto, listSignatures } from '../signatures';
import { parseInput } from '../validation/parse';
import {
  type CapaOutcome,
  approvePlan,
  cancelCapa,
  openEffectivenessCheck,
  recordEffective,
  recordNotEffective,
  startImplementation,
} from './commands';
import { type CapaDto, capaKind } from './kind';
import type { CapaActionCategory, CapaActionKind } from './labels';
import { type RecurrenceEvidence, computeRecurrence } from './recurrence';
import { type RecurrenceCriterion, capaEventRequestSchema, parseRecurrenceCriterion } from './schemas';

/*
 * Everything the CAPA page shows, as one DTO: the record, where it came from, the plan's actions (every
 * round, the earlier ones read-only), the recurrence evidence beside the criterion, what this person
 * may do, and the story (history, signatures, and the audit trail for the roles that may read it).
 */

export interface CapaActionDto {
  id: number;
  version: number;
  round: number;
  kind: CapaActionKind;
  category: CapaActionCategory;
  description: string;
  ownerId: number;
  ownerName: string;
  dueAt: string;
  completedAt: string | null;
  completedByName: string | null;
  evidence: string | null;
  overdue: boolean;
  /** This viewer may record it as completed now. */
  canComplete: boolean;
  /** This viewer may change it now (planning, current round, not completed). */
  canEdit: boolean;
}

export interface CapaSourceDto {
  type: CapaDto['sourceType'];
  id: number | null;
  number: string | null;
  title: string | null;
  href: string | null;
}

export interface CapaDetailDto {
  capa: CapaDto;
  ownerName: string;
  createdByName: string;
  source: CapaSourceDto;
  actions: CapaActionDto[];
  criterion: RecurrenceCriterion | null;
  recurrence: RecurrenceEvidence | null;
  allowedEvents: AllowedEvent<CapaEventType>[];
  /** Events this person's role sends now but this CAPA refuses them, with the reason (segregation of duties, a guard). */
  blockedEvents: BlockedEvent<CapaEventType>[];
  /** Which sections this person may edit now, and why not. */
  sections: RecordAbilities<CapaEventType, SectionOf<typeof capaKind>>['sections'];
  /** The plan and its actions may be edited by this viewer now. */
  canPlan: boolean;
  history: HistoryEntryDto[];
  signatures: SignatureDto[];
  audit: AuditEntryDto[] | null;
  userNames: Record<number, string>;
}

async function namesOf(dbOrTx: DbOrTx, ids: number[]): Promise<Record<number, string>> {
  const wanted = [...new Set(ids)];
  if (wanted.length === 0) return {};
  const rows = await dbOrTx.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, wanted));
  return Object.fromEntries(rows.map((r) => [r.id, r.name]));
}

async function sourceOf(dbOrTx: DbOrTx, row: typeof capas.$inferSelect): Promise<CapaSourceDto> {
  const base: CapaSourceDto = { type: row.sourceType, id: row.sourceId, number: null, title: null, href: null };
  if (row.sourceId === null) return base;
  if (row.sourceType === 'deviation') {
    const [d] = await dbOrTx.select({ number: deviations.number, title: deviations.title }).from(deviations).where(eq(deviations.id, row.sourceId));
    return d ? { ...base, number: d.number, title: d.title, href: `/deviations/${row.sourceId}` } : base;
  }
  if (row.sourceType === 'complaint') {
    const [c] = await dbOrTx.select({ number: complaints.number }).from(complaints).where(eq(complaints.id, row.sourceId));
    return c ? { ...base, number: c.number, href: `/complaints/${row.sourceId}` } : base;
  }
  return base;
}

export async function getCapaDetail(id: number, viewer: RecordActor, dbOrTx: DbOrTx = db, now: Date = new Date()): Promise<CapaDetailDto> {
  const row = await getVisibleRow(dbOrTx, capaKind, id, viewer);
  const facts = await loadRelated(capaKind, dbOrTx, row);
  const abilities = abilitiesOf(capaKind, viewer, row, facts);

  const criterion = parseRecurrenceCriterion(row.recurrenceCriterion);
  const [actionRows, source, recurrence, history, signatures, audit] = await Promise.all([
    [...facts.actions].sort((a, b) => a.round - b.round || a.id - b.id),
    sourceOf(dbOrTx, row),
    criterion ? computeRecurrence(dbOrTx, criterion, row.actionsCompletedAt, now, row.closedAt) : Promise.resolve(null),
    listStateHistory(dbOrTx, capaKind, row.id),
    listSignatures(dbOrTx, 'capa', row.id, (meaning) => signedContentOf(capaKind, meaning, row, facts), capaKind.signedPartLabels),
    can(viewer, 'audit.read') ? listAuditTrail(dbOrTx, 'capa', row.id) : Promise.resolve(null),
  ]);
  const names = await namesOf(dbOrTx, [
    row.ownerId,
    row.createdBy,
    ...actionRows.flatMap((a) => [a.ownerId, ...(a.completedBy ? [a.completedBy] : [])]),
    ...userIdsInChanges(audit),
    ...(audit ?? []).flatMap((e) =>
      e.changes.filter((c) => /· (ownerId|completedBy)$/.test(c.field)).flatMap((c) => [c.from, c.to].filter((v): v is number => typeof v === 'number')),
    ),
  ]);
  const canPlan = abilities.sections.plan.editable;

  return {
    capa: capaKind.toDto(row),
    ownerName: names[row.ownerId] ?? 'Unknown user',
    createdByName: names[row.createdBy] ?? 'Unknown user',
    source,
    actions: actionRows.map((a) => ({
      id: a.id,
      version: a.version,
      round: a.round,
      kind: a.kind,
      category: a.category as CapaActionCategory,
      description: a.description,
      ownerId: a.ownerId,
      ownerName: names[a.ownerId] ?? 'Unknown user',
      dueAt: a.dueAt.toISOString(),
      completedAt: a.completedAt?.toISOString() ?? null,
      completedByName: a.completedBy ? (names[a.completedBy] ?? null) : null,
      evidence: a.evidence,
      overdue: a.completedAt === null && a.dueAt < now && row.status !== 'cancelled',
      canComplete: a.round === row.planRound && a.completedAt === null && checkSection(capaKind, viewer, row, facts, 'completion', { actionId: a.id }).ok,
      canEdit: abilities.sections.actions.editable && a.round === row.planRound && a.completedAt === null,
    })),
    criterion,
    recurrence,
    ...abilities,
    canPlan,
    history,
    signatures,
    audit,
    userNames: names,
  };
}

export interface OptionDto {
  id: number;
  label: string;
}

export interface CapaPlanOptionsDto {
  owners: OptionDto[];
  actionOwners: OptionDto[];
  defects: OptionDto[];
  machines: OptionDto[];
  rings: OptionDto[];
}

/** Choices for the plan forms: CAPA owners (active QA investigators), action owners, and the criterion's lookups. */
export async function getCapaPlanOptions(dbOrTx: DbOrTx = db): Promise<CapaPlanOptionsDto> {
  const [owners, actionOwners, defects, machineRows, rings] = await Promise.all([
    dbOrTx
      .select({ id: users.id, name: users.name })
      .from(users)
      .where(and(eq(users.role, 'qa_investigator'), eq(users.active, true)))
      .orderBy(asc(users.name)),
    dbOrTx
      .select({ id: users.id, name: users.name, role: users.role })
      .from(users)
      .where(and(ne(users.role, 'admin'), eq(users.active, true)))
      .orderBy(asc(users.name)),
    dbOrTx.select({ id: capsuleDefects.id, name: capsuleDefects.name }).from(capsuleDefects).orderBy(asc(capsuleDefects.name)),
    dbOrTx.select({ id: machines.id, assetTag: machines.assetTag, name: machines.name }).from(machines).orderBy(asc(machines.assetTag)),
    dbOrTx.select({ id: fillingRings.id, serial: fillingRings.serial }).from(fillingRings).orderBy(asc(fillingRings.serial)),
  ]);
  return {
    owners: owners.map((u) => ({ id: u.id, label: u.name })),
    actionOwners: actionOwners.map((u) => ({ id: u.id, label: `${u.name} (${u.role.replace('_', ' ')})` })),
    defects: defects.map((d) => ({ id: d.id, label: d.name })),
    machines: machineRows.map((m) => ({ id: m.id, label: `${m.assetTag} — ${m.name}` })),
    rings: rings.map((r) => ({ id: r.id, label: r.serial })),
  };
}

/**
 * Sends one lifecycle event to the command that performs it. Each command parses what its event
 * needs and runs the write path, so role, record, version and guards are checked there.
 */
export async function sendCapaEvent(actor: RecordActor, id: number, raw: unknown): Promise<CapaOutcome> {
  const { event, version, reason, password } = parseInput(capaEventRequestSchema, raw);
  switch (event) {
    case 'approve_plan':
      return approvePlan(actor, { id, version, password: password ?? '' });
    case 'start_implementation':
      return startImplementation(actor, { id, version });
    case 'open_effectiveness_check':
      return openEffectivenessCheck(actor, { id, version, reason: reason ?? null });
    case 'record_effective':
      return recordEffective(actor, { id, version, password: password ?? '' });
    case 'record_not_effective':
      return recordNotEffective(actor, { id, version, reason: reason ?? '', password: password ?? '' });
    case 'cancel':
      return cancelCapa(actor, { id, version, reason: reason ?? '', password: password ?? '' });
  }
}
