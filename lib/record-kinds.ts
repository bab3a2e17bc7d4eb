import 'server-only';
import { capaKind } from './capa/kind';
import { complaintKind } from './complaints/kind';
import { deviationKind } from './deviations/kind';
import type { AnyRecordKind } from './records/kind';
import { numberPrefixes, type RecordType } from './records/types';

/*
 * The record kinds that carry evidence files and comments, by record type, with how each is named
 * and linked on the page. Shared services (lib/attachments, lib/comments) find a record's rules
 * here; the rules themselves are the kind's own. It lives outside lib/records so that lib/records
 * never imports the kinds built on it.
 */

export interface KindPresentation {
  kind: AnyRecordKind;
  /** e.g. "DEV-2026-0042", or "Draft deviation". */
  label: (row: Record<string, unknown>) => string;
  title: (row: Record<string, unknown>) => string;
  path: (id: number) => string;
}

const text = (v: unknown) => (typeof v === 'string' ? v : '');

export const evidenceKinds = {
  deviation: {
    kind: deviationKind,
    label: (row) => text(row.number) || 'Draft deviation',
    title: (row) => text(row.title),
    path: (id) => `/deviations/${id}`,
  },
  complaint: {
    kind: complaintKind,
    label: (row) => text(row.number),
    title: (row) => `Complaint ${text(row.number)}`,
    path: (id) => `/complaints/${id}`,
  },
  capa: {
    kind: capaKind,
    label: (row) => text(row.number),
    title: (row) => text(row.title),
    path: (id) => `/capa/${id}`,
  },
} satisfies Record<string, KindPresentation>;

export type EvidenceRecordType = keyof typeof evidenceKinds;
export const evidenceRecordTypes = Object.keys(evidenceKinds) as EvidenceRecordType[];

export function isEvidenceRecordType(value: string): value is EvidenceRecordType {
  return value in evidenceKinds;
}

/** The noun a missing record of this type is reported with. */
export function missingNoun(recordType: RecordType): string {
  return recordType in numberPrefixes ? `This ${recordType}` : 'The record';
}
