import type { AuditActor } from '../../lib/audit';
import { closureRecordIdOf } from '../../lib/clocks/closure-id';
import { defaultDueDays, dueDaySettingKeys } from '../../lib/clocks/due-dates';
import type { RecordType } from '../../lib/records/types';
import type { Tx } from '../../db/client';
import { settings, siteClosures } from '../../db/schema';

/*
 * The demo site calendar: closure targets by classification (critical 15, major 30, minor 30
 * calendar days: common practice, no published source) and two site closures, a summer plant
 * shutdown week and the day after Thanksgiving, which is a site holiday at Brackwater but not a
 * federal one.
 */

export const demoClosures: readonly { day: string; description: string }[] = [
  ...['2026-08-03', '2026-08-04', '2026-08-05', '2026-08-06', '2026-08-07'].map((day) => ({
    day,
    description: 'Summer plant shutdown (planned maintenance)',
  })),
  { day: '2026-11-27', description: 'Site holiday: day after Thanksgiving' },
];

export const demoSiteTimeZone = 'America/Chicago';

export async function seedClocks(
  tx: Tx,
  actor: AuditActor,
  created: (recordType: RecordType, recordId: number, values: Record<string, unknown>) => Promise<unknown>,
): Promise<void> {
  for (const [classification, key] of Object.entries(dueDaySettingKeys) as [keyof typeof defaultDueDays, string][]) {
    const value = String(defaultDueDays[classification]);
    await tx.insert(settings).values({ key, value });
    await created('setting', 0, { [key]: value });
  }
  // "Today" for every clock is the day at the site, wherever the server runs.
  await tx.insert(settings).values({ key: 'site_time_zone', value: demoSiteTimeZone });
  await created('setting', 0, { site_time_zone: demoSiteTimeZone });
  for (const c of demoClosures) {
    await tx
      .insert(siteClosures)
      .values({ ...c, active: true, createdBy: actor.id!, createdAt: new Date('2026-07-01T06:00:00.000Z') });
    await created('site_closure', closureRecordIdOf(c.day), { ...c, active: true });
  }
}
