import 'server-only';
import type { DbOrTx } from '../../db/client';
import { NotFoundError } from '../errors';
import { type EvidenceRecordType, evidenceKinds, evidenceRecordTypes, isEvidenceRecordType, missingNoun } from '../record-kinds';
import type { Actor } from '../auth/permissions';
import { checkSection, isVisibleTo } from '../records/kind';
import { getVisibleRow, loadRelated } from '../records/write-path';
import type { RecordType } from '../records/types';

/*
 * Who may see and add to a record's evidence and comments, for every record type that has them.
 * Evidence and comments follow the record: whoever may see it may see them, and a record the viewer
 * may not see is reported as missing. Who may add evidence, and in which states, is the record
 * kind's "evidence" section (e.g. lib/deviations/kind.ts): up to the decision, by the record's
 * author and QA; nothing once closed, since evidence added after the decision would not have been
 * part of it (ALCOA+ contemporaneous; EU GMP Annex 11 §9). Evidence is never removed
 * (21 CFR 211.180): there is no delete command.
 */

export { type EvidenceRecordType, evidenceRecordTypes, isEvidenceRecordType };

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
  /** 403 when it is not theirs to add, 409 when the record's state keeps everyone out; null when they may. */
  attachRefusalStatus: 403 | 409 | null;
  /** Whether another person may see the record (for mentions). */
  readableBy: (user: Actor) => boolean;
}

/** The record as this viewer may see it; missing or not visible → NotFoundError. */
export async function getRecordAccess(dbOrTx: DbOrTx, recordType: RecordType, recordId: number, viewer: Actor): Promise<RecordAccess> {
  if (!isEvidenceRecordType(recordType)) throw new NotFoundError(missingNoun(recordType));
  const presentation = evidenceKinds[recordType];
  const kind = presentation.kind;
  const row = await getVisibleRow(dbOrTx, kind, recordId, viewer);
  const check = checkSection(kind, viewer, row, await loadRelated(kind, dbOrTx, row), 'evidence');
  return {
    recordType,
    recordId,
    label: presentation.label(row),
    title: presentation.title(row),
    path: presentation.path(recordId),
    attachRefusal: check.ok ? null : check.reason,
    attachRefusalStatus: check.ok ? null : check.status,
    readableBy: (user) => isVisibleTo(kind, user, row),
  };
}
