import 'server-only';
import { weightChecks } from '../../db/schema';
import { defineRecordKind } from '../records/kind';

/*
 * Weight checks on the write path: a plain kind that is only ever created. A recorded check is
 * never edited; a wrong one is followed by a new check (and, when it failed, a deviation).
 */

export type WeightCheckRow = typeof weightChecks.$inferSelect;

/** Every stored fact of the check except the full evaluation, which follows from them. */
export const weightCheckAuditFields = [
  'batchId',
  'productId',
  'machineId',
  'ringId',
  'method',
  'massMode',
  'shellMassMg',
  'massesMg',
  'sampleSize',
  'meanMg',
  'sdMg',
  'minMg',
  'maxMg',
  'outOfLimitCount',
  'verdict',
  'note',
  'checkedAt',
] as const satisfies readonly (keyof WeightCheckRow)[];

export const weightCheckKind = defineRecordKind({
  recordType: 'weight_check',
  noun: 'weight check',
  table: weightChecks,
  readPermission: 'weight_check.read',
  owners: (t) => [t.recordedBy],
  stateOf: () => 'recorded',
  stateLabels: { recorded: 'Recorded' },
  auditFields: weightCheckAuditFields,
  toDto: (row: WeightCheckRow) => ({ id: row.id, batchId: row.batchId, verdict: row.verdict, version: row.version }),
});
