import 'server-only';
import { riskScaleVersions } from '../../db/schema';
import { defineRecordKind } from '../records/kind';

/*
 * Published risk scale versions on the write path: a plain kind that is only ever created. A
 * version is never edited (the table is append-only for the application's database user), so it
 * has no sections; a change of wording is a new record with all 30 steps as its children.
 */

export type RiskScaleVersionRow = typeof riskScaleVersions.$inferSelect;

export const riskScaleKind = defineRecordKind({
  recordType: 'risk_scale',
  noun: 'risk scale version',
  table: riskScaleVersions,
  // Everyone who scores reads the scales; this kind's own reads are for the administrators who publish.
  readPermission: 'risk.manage_scales',
  stateOf: () => 'published',
  stateLabels: { published: 'Published' },
  // A publication is audited against the version it replaces, step by step (the command's `audit`),
  // which says more than a column going from nothing to its value.
  auditFields: [],
  toDto: (row: RiskScaleVersionRow) => ({ id: row.id, scaleVersion: row.scaleVersion, version: row.version }),
});
