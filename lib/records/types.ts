/* Every kind of record the audit trail, signatures, links, comments and attachments can point at. */

export const recordTypes = [
  'deviation',
  'capa',
  'complaint',
  'filling_ring',
  'machine',
  'product',
  'batch',
  'capsule_defect',
  'user',
  'setting',
  'risk_scale',
  'site_closure',
  'weight_check',
] as const;
export type RecordType = (typeof recordTypes)[number];

/** Prefixes of human record numbers, e.g. DEV-2026-0042. */
export const numberPrefixes = { deviation: 'DEV', capa: 'CAPA', complaint: 'CMP' } as const;
export type NumberedRecordType = keyof typeof numberPrefixes;
