import 'server-only';
import { and, asc, eq, gte, inArray, lte } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { settings, siteClosures, users } from '../../db/schema';
import { type AuditEntryDto, listAuditTrail } from '../records/trail';
import { closureRecordIdOf } from '../clocks/closure-id';
import { addDays, type IsoDate, todayIn } from '../clocks/dates';
import { type BusinessCalendar, makeCalendar } from '../clocks/business-days';
import { type Classification, type DueDaySetting, dueDaySettingKeys, readDueDaySettings } from '../clocks/due-dates';

/*
 * Reads for the site calendar: closures for a date range (a calendar only ever needs the days
 * around a clock, never the whole table) and the closure targets by classification.
 */

export interface SiteClosureDto {
  id: number;
  day: IsoDate;
  description: string;
  active: boolean;
  createdByName: string;
  createdAt: Date;
}

export async function listSiteClosures(
  range: { from: IsoDate; to: IsoDate },
  database: DbOrTx = db,
): Promise<SiteClosureDto[]> {
  return database
    .select({
      id: siteClosures.id,
      day: siteClosures.day,
      description: siteClosures.description,
      active: siteClosures.active,
      createdByName: users.name,
      createdAt: siteClosures.createdAt,
    })
    .from(siteClosures)
    .innerJoin(users, eq(users.id, siteClosures.createdBy))
    .where(and(gte(siteClosures.day, range.from), lte(siteClosures.day, range.to)))
    .orderBy(asc(siteClosures.day));
}

/**
 * A closure's audit trail, oldest first: the entries naming its id, and those written before
 * closures had ids, which name its day as a number (lib/clocks/closure-id.ts).
 */
export async function listSiteClosureTrail(day: IsoDate, database: DbOrTx = db): Promise<AuditEntryDto[]> {
  const [closure] = await database.select({ id: siteClosures.id }).from(siteClosures).where(eq(siteClosures.day, day));
  if (!closure) return [];
  return listAuditTrail(database, 'site_closure', [closure.id, closureRecordIdOf(day)], { oldestFirst: true, limit: 1000 });
}

/**
 * The business calendar for clocks that run between `from` and about `horizonDays` after it. The
 * horizon must cover the longest clock: 15 business days never span more than about 30 calendar
 * days, so the default leaves ample room for a long shutdown.
 */
export async function getBusinessCalendar(from: IsoDate, horizonDays = 400, database: DbOrTx = db): Promise<BusinessCalendar> {
  const rows = await database
    .select({ day: siteClosures.day, description: siteClosures.description })
    .from(siteClosures)
    .where(and(eq(siteClosures.active, true), gte(siteClosures.day, from), lte(siteClosures.day, addDays(from, horizonDays))));
  return makeCalendar(rows);
}

export async function getDueDaySettings(database: DbOrTx = db): Promise<Record<Classification, DueDaySetting>> {
  const rows = await database
    .select({ key: settings.key, value: settings.value })
    .from(settings)
    .where(inArray(settings.key, Object.values(dueDaySettingKeys)));
  return readDueDaySettings(Object.fromEntries(rows.map((r) => [r.key, r.value])));
}

export const siteTimeZoneKey = 'site_time_zone';

/** The site's IANA time zone from settings; UTC when unset or not a zone this runtime knows. */
export async function getSiteTimeZone(database: DbOrTx = db): Promise<string> {
  const [row] = await database.select({ value: settings.value }).from(settings).where(eq(settings.key, siteTimeZoneKey));
  if (!row) return 'UTC';
  try {
    todayIn(row.value, new Date(0));
    return row.value;
  } catch {
    return 'UTC';
  }
}
