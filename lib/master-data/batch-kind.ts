import 'server-only';
import { batches } from '../../db/schema';
import { defineRecordKind } from '../records/kind';
import { batchStatusLabels } from './queries';

/*
 * Batches on the write path. Today a batch's status changes only as a consequence of a deviation
 * (hold, release, reject), written by lib/records' writeConsequence inside the deviation's own
 * transaction; entering and importing batches is master-data work for administrators.
 */

export type BatchRow = typeof batches.$inferSelect;

export const batchKind = defineRecordKind({
  recordType: 'batch',
  noun: 'batch',
  table: batches,
  readPermission: 'batch.read',
  stateOf: (row) => row.status,
  stateLabels: batchStatusLabels,
  auditFields: ['lotNumber', 'productId', 'machineId', 'ringId', 'sizeCapsules', 'unitsShipped', 'manufacturedOn', 'expiresOn'],
  toDto: (row: BatchRow) => ({ id: row.id, lotNumber: row.lotNumber, status: row.status, version: row.version }),
});
