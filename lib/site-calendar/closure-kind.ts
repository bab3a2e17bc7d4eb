import 'server-only';
import { siteClosures } from '../../db/schema';
import { defineRecordKind } from '../records/kind';

/*
 * Site closures on the write path: a plain kind, one record per day, active or inactive. A closure
 * is never deleted, so a business-day clock computed while it was active can still be explained
 * from the audit trail; it is deactivated with a reason and reactivated by adding the day again.
 */

export type SiteClosureRow = typeof siteClosures.$inferSelect;

export const closureStateLabels = { active: 'Site closed', inactive: 'Inactive' } as const;

export const siteClosureKind = defineRecordKind({
  recordType: 'site_closure',
  noun: 'site closure',
  table: siteClosures,
  readPermission: 'calendar.manage',
  stateOf: (row: SiteClosureRow) => (row.active ? 'active' : 'inactive'),
  stateLabels: closureStateLabels,
  sections: {
    // The forms name a day, not a version, so "already inactive" (or active) is how a change made
    // meanwhile shows: the commands answer it as a conflict with the day in the message.
    deactivation: { label: 'Deactivating the closure', permission: 'calendar.manage', states: 'any' },
    reactivation: { label: 'Reactivating the closure', permission: 'calendar.manage', states: 'any' },
  },
  auditFields: ['day', 'active', 'description'],
  toDto: (row: SiteClosureRow) => ({ id: row.id, day: row.day, description: row.description, active: row.active, version: row.version }),
});
