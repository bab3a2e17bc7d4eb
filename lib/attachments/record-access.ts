import 'server-only';
import { and, eq } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { capaActions, capas, complaints, deviations } from '../../db/schema';
import { type Actor, can } from '../auth/permissions';
import { ForbiddenError, NotFoundError } from '../errors';
import { numberPrefixes, type RecordType } from '../records/types';

/*
 * Who may see and add to a record's evidence and comments, for every record type that has them.
 * Evidence and comments follow the record: whoever may read it may read them, and a record the
 * viewer may not read is reported as missing. Deviations, complaints and CAPAs have them; another
 * record type adds a loader here and reuses the rest.
 *
 * Adding evidence (permission attachment.add: the record's author 'own', QA 'any'):
 * - a draft: its author only (nobody else can see a draft);
 * - an open record: its author (a further photo from the line) and QA;
 * - a closed or cancelled record: nobody. Evidence added after the decision would not have been
 *   part of it (ALCOA+ contemporaneous; EU GMP Annex 11 §9: changes after approval are controlled),
 *   so it belongs on a new record or a comment.
 * Evidence is never removed (21 CFR 211.180, records retained); there is no delete command.
 */

export type EvidenceRecordType = Extract<RecordType, 'deviation' | 'complaint' | 'capa'>;
export const evidenceRecordTypes = ['deviation', 'complaint', 'capa'] as const satisfies readonly EvidenceRecordType[];

export interface RecordAccess {
  recordType: EvidenceRecordType;
  recordId: number;
  /** e.g. "DEV-2026-0042", or "Draft deviation". */
  label: string;
  title: string;
  /** Path of the record's page in the app. */
  path: string;
  /** Why this viewer may not add evidence now, or null when they may. */
  attachRefusal: string | null;
  /** Whether another person may read the record (for mentions). */
  readableBy: (user: Actor) => boolean;
}

type Loader = (dbOrTx: DbOrTx, id: number, viewer: Actor, lock: boolean) => Promise<RecordAccess | null>;

const loadDeviation: Loader = async (dbOrTx, id, viewer, lock) => {
  const query = dbOrTx
    .select({ id: deviations.id, status: deviations.status, raisedBy: deviations.raisedBy, number: deviations.number, title: deviations.title })
    .from(deviations)
    .where(eq(deviations.id, id));
  const [row] = lock ? await query.for('update') : await query;
  if (!row) return null;
  const scope = { ownerIds: [row.raisedBy] };
  // A draft is its author's notebook until submitted (the same rule as lib/deviations/detail.ts).
  const readableBy = (user: Actor) => can(user, 'deviation.read', scope) && (row.status !== 'draft' || row.raisedBy === user.id);
  if (!readableBy(viewer)) return null;
  let attachRefusal: string | null = null;
  if (row.status === 'closed' || row.status === 'cancelled') {
    attachRefusal = `This deviation is ${row.status}; evidence can no longer be added. Add a comment or raise a new record.`;
  } else if (!can(viewer, 'attachment.add', scope)) {
    attachRefusal = 'Only the person who raised this deviation and QA can add evidence to it.';
  }
  return {
    recordType: 'deviation',
    recordId: row.id,
    label: row.number ?? 'Draft deviation',
    title: row.title,
    path: `/deviations/${row.id}`,
    attachRefusal,
    readableBy,
  };
};

/*
 * A complaint's evidence (photos of the capsules, the returned pack) follows the complaint: readable
 * by whoever may read it (an operator: the ones they entered), added by the person who took it down
 * and by QA until it is closed. A reopened complaint takes evidence again.
 */
const loadComplaint: Loader = async (dbOrTx, id, viewer, lock) => {
  const query = dbOrTx
    .select({ id: complaints.id, status: complaints.status, createdBy: complaints.createdBy, ownerId: complaints.ownerId, number: complaints.number })
    .from(complaints)
    .where(eq(complaints.id, id));
  const [row] = lock ? await query.for('update') : await query;
  if (!row) return null;
  const scope = { ownerIds: [row.createdBy, row.ownerId] };
  const readableBy = (user: Actor) => can(user, 'complaint.read', scope);
  if (!readableBy(viewer)) return null;
  let attachRefusal: string | null = null;
  if (row.status === 'closed') {
    attachRefusal = 'This complaint is closed; evidence can no longer be added. Reopen it if new evidence arrives.';
  } else if (!can(viewer, 'attachment.add', scope)) {
    attachRefusal = 'Only the person who took this complaint down and QA can add evidence to it.';
  }
  return { recordType: 'complaint', recordId: row.id, label: row.number, title: `Complaint ${row.number}`, path: `/complaints/${row.id}`, attachRefusal, readableBy };
};

/*
 * A CAPA's evidence (the revised procedure, the training record, the work order) is read by whoever
 * reads CAPAs. It is added by the CAPA's owner and QA while the CAPA is open, and by the owners of
 * the current round's actions while those actions are being done (plan approved, implementation):
 * 21 CFR 820.100(a)(7), the activities and their results are documented by those who did them. Once
 * closed effective or cancelled, nobody adds to it: the decision was taken on what was there.
 */
const loadCapa: Loader = async (dbOrTx, id, viewer, lock) => {
  const query = dbOrTx
    .select({ id: capas.id, status: capas.status, ownerId: capas.ownerId, number: capas.number, title: capas.title, planRound: capas.planRound })
    .from(capas)
    .where(eq(capas.id, id));
  const [row] = lock ? await query.for('update') : await query;
  if (!row) return null;
  const readableBy = (user: Actor) => can(user, 'capa.read', { ownerIds: [row.ownerId] });
  if (!readableBy(viewer)) return null;
  let attachRefusal: string | null = null;
  if (row.status === 'closed_effective' || row.status === 'cancelled') {
    const state = row.status === 'cancelled' ? 'cancelled' : 'closed as effective';
    attachRefusal = `This CAPA is ${state}; evidence can no longer be added. Raise a new record if something new turns up.`;
  } else {
    const doing = row.status === 'plan_approved' || row.status === 'implementation';
    const actionOwners = doing
      ? (
          await dbOrTx
            .select({ ownerId: capaActions.ownerId })
            .from(capaActions)
            .where(and(eq(capaActions.capaId, row.id), eq(capaActions.round, row.planRound)))
        ).map((a) => a.ownerId)
      : [];
    if (!can(viewer, 'attachment.add', { ownerIds: [row.ownerId, ...actionOwners] })) {
      attachRefusal = doing
        ? 'Only the CAPA owner, QA and the owners of its actions can add evidence to it.'
        : 'Only the CAPA owner and QA can add evidence now; action owners add theirs once the plan is approved.';
    }
  }
  return { recordType: 'capa', recordId: row.id, label: row.number, title: row.title, path: `/capa/${row.id}`, attachRefusal, readableBy };
};

const loaders: Record<EvidenceRecordType, Loader> = { deviation: loadDeviation, complaint: loadComplaint, capa: loadCapa };

export function isEvidenceRecordType(value: string): value is EvidenceRecordType {
  return (evidenceRecordTypes as readonly string[]).includes(value);
}

/** The record as this viewer may see it; missing or unreadable → NotFoundError. `lock` reads it FOR UPDATE. */
export async function getRecordAccess(
  dbOrTx: DbOrTx,
  recordType: RecordType,
  recordId: number,
  viewer: Actor,
  options: { lock?: boolean } = {},
): Promise<RecordAccess> {
  const noun = recordType in numberPrefixes ? `This ${recordType}` : 'The record';
  if (!isEvidenceRecordType(recordType)) throw new NotFoundError(noun);
  const access = await loaders[recordType](dbOrTx, recordId, viewer, options.lock ?? false);
  if (!access) throw new NotFoundError(noun);
  return access;
}

export function assertMayAttach(access: RecordAccess): void {
  if (access.attachRefusal) throw new ForbiddenError(access.attachRefusal);
}
