import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, siteClosures, users } from '@/db/schema';
import { hashPassword } from '@/lib/auth/passwords';
import type { Role } from '@/lib/auth/roles';
import { addBusinessDays, federalCalendar } from '@/lib/clocks/business-days';
import { closureRecordIdOf } from '@/lib/clocks/closure-id';
import { addDays, type IsoDate } from '@/lib/clocks/dates';
import { isBusinessDay } from '@/lib/clocks/business-days';
import { ConflictError, ForbiddenError, ValidationError } from '@/lib/errors';
import { addSiteClosure, deactivateSiteClosure, updateDueDays, type CalendarActor } from '@/lib/site-calendar/commands';
import { writeAudit } from '@/lib/audit';
import { getBusinessCalendar, getDueDaySettings, listSiteClosureTrail, listSiteClosures } from '@/lib/site-calendar/queries';

/*
 * The site calendar is GMP configuration: every change is attributable and audited (21 CFR
 * 11.10(e)), closures are deactivated and never deleted, and only an administrator changes it.
 * Each test takes its own far-future days and its own users; the due-day targets are put back.
 */

let seq = 0;
async function makeUser(role: Role): Promise<CalendarActor> {
  const name = `Calendar ${role} ${process.pid}-${seq++}`;
  const [row] = await db
    .insert(users)
    .values({ email: `cal-${role}-${process.pid}-${Date.now()}-${seq}@brackwater.example`, name, role, passwordHash: await hashPassword('x'.repeat(12)) })
    .$returningId();
  return { id: row!.id, name, role };
}

/** A business day in the 2100s nobody else uses: spread by pid and time, then moved to a weekday. */
function freshDay(): IsoDate {
  let day = addDays('2101-01-03', ((process.pid * 7919 + Date.now()) % 30_000) + seq++ * 3);
  while (!isBusinessDay(day, federalCalendar)) day = addDays(day, 1);
  return day;
}

const auditOf = (recordType: 'site_closure' | 'setting', recordId: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.recordId, recordId)))
    .orderBy(asc(auditEntries.id));

/** A closure's audit entries name its id. */
const closureIdOf = async (day: IsoDate) => (await db.select({ id: siteClosures.id }).from(siteClosures).where(eq(siteClosures.day, day)))[0]!.id;

const changesOf = (entry: { changes: string }) => JSON.parse(entry.changes) as { field: string; from: unknown; to: unknown }[];

afterAll(closeDb);

describe('site closures', () => {
  it('an administrator adds a closure: stored, audited, and skipped by business-day clocks (21 CFR 11.10(e))', async () => {
    const admin = await makeUser('admin');
    const day = freshDay();
    const before = addDays(day, -1);
    await addSiteClosure(admin, { day, description: 'Boiler replacement' });

    const [entry] = await auditOf('site_closure', await closureIdOf(day));
    expect(entry).toMatchObject({ action: 'closure_added', userId: admin.id, userName: admin.name });
    expect(changesOf(entry!)).toContainEqual({ field: 'description', from: null, to: 'Boiler replacement' });

    const calendar = await getBusinessCalendar(addDays(day, -10));
    expect(calendar.closures.get(day)).toBe('Boiler replacement');
    // The day after `before` would be `day`, which is now closed.
    expect(addBusinessDays(before, 1, calendar)).not.toBe(day);
    expect(addBusinessDays(before, 1, federalCalendar)).toBe(day);
    const listed = await listSiteClosures({ from: day, to: day });
    expect(listed).toEqual([expect.objectContaining({ day, active: true, createdByName: admin.name })]);
  });

  it('refuses a second closure on the same day, and a day that is already a weekend or federal holiday', async () => {
    const admin = await makeUser('admin');
    const day = freshDay();
    await addSiteClosure(admin, { day, description: 'Shutdown' });
    await expect(addSiteClosure(admin, { day, description: 'Again' })).rejects.toThrow(/already a site closure/);
    // 5 U.S.C. 6103(a): Thanksgiving 2101 is Thursday 24 November.
    const holiday = addSiteClosure(admin, { day: '2101-11-24', description: 'Closed' });
    await expect(holiday).rejects.toBeInstanceOf(ValidationError);
    await expect(addSiteClosure(admin, { day: '2101-11-24', description: 'Closed' })).rejects.toMatchObject({
      fieldErrors: { day: [expect.stringMatching(/Thanksgiving Day/)] },
    });
    await expect(addSiteClosure(admin, { day: '2101-01-01T00:00', description: 'Closed' })).rejects.toBeInstanceOf(
      ValidationError,
    );
  });

  it('deactivates with a reason and never deletes; adding the day again reactivates it (21 CFR 11.10(e))', async () => {
    const admin = await makeUser('admin');
    const day = freshDay();
    await addSiteClosure(admin, { day, description: 'Planned maintenance' });
    await expect(deactivateSiteClosure(admin, { day, reason: '' })).rejects.toBeInstanceOf(ValidationError);
    await deactivateSiteClosure(admin, { day, reason: 'Maintenance moved to the spring' });

    const [row] = await db.select().from(siteClosures).where(eq(siteClosures.day, day));
    expect(row).toMatchObject({ active: false, description: 'Planned maintenance' });
    expect((await getBusinessCalendar(addDays(day, -5))).closures.has(day)).toBe(false);
    await expect(deactivateSiteClosure(admin, { day, reason: 'again please' })).rejects.toBeInstanceOf(ConflictError);

    await addSiteClosure(admin, { day, description: 'Planned maintenance, rebooked' });
    const trail = await auditOf('site_closure', await closureIdOf(day));
    expect(trail.map((e) => e.action)).toEqual(['closure_added', 'closure_deactivated', 'closure_reactivated']);
    expect(trail[1]!.reason).toBe('Maintenance moved to the spring');
    expect(changesOf(trail[2]!)).toEqual([
      { field: 'active', from: false, to: true },
      { field: 'description', from: 'Planned maintenance', to: 'Planned maintenance, rebooked' },
    ]);
  });

  it('keeps the entries written before closures had ids in the closure’s trail (21 CFR 11.10(e): the trail stays readable)', async () => {
    const admin = await makeUser('admin');
    const day = freshDay();
    // As migration 0010 leaves a closure added before it: the row, and its entry naming the day as a number.
    await writeAudit(db, {
      actor: { id: admin.id, name: admin.name },
      recordType: 'site_closure',
      recordId: closureRecordIdOf(day),
      action: 'closure_added',
      changes: [{ field: 'day', from: null, to: day }],
    });
    await db.insert(siteClosures).values({ day, description: 'Added before closures had ids', active: true, createdBy: admin.id });
    await deactivateSiteClosure(admin, { day, reason: 'No longer planned' });

    const trail = await listSiteClosureTrail(day);
    expect(trail.map((e) => e.action)).toEqual(['closure_added', 'closure_deactivated']);
    expect(trail[1]).toMatchObject({ reason: 'No longer planned', changes: [{ field: 'active', from: true, to: false }] });
    expect((await auditOf('site_closure', await closureIdOf(day))).map((e) => e.action)).toEqual(['closure_deactivated']);
  });

  it('reports a missing closure as not found', async () => {
    const admin = await makeUser('admin');
    await expect(deactivateSiteClosure(admin, { day: freshDay(), reason: 'no such day' })).rejects.toThrow(/not found/);
  });

  it('refuses every role but the administrator', async () => {
    for (const role of ['operator', 'supervisor', 'qa_investigator', 'qa_approver'] as const) {
      const person = await makeUser(role);
      await expect(addSiteClosure(person, { day: freshDay(), description: 'Closed' })).rejects.toBeInstanceOf(ForbiddenError);
      await expect(deactivateSiteClosure(person, { day: freshDay(), reason: 'nope' })).rejects.toBeInstanceOf(ForbiddenError);
      await expect(updateDueDays(person, { critical: 10, major: 20, minor: 30, reason: 'nope' })).rejects.toBeInstanceOf(
        ForbiddenError,
      );
    }
  });
});

describe('closure targets (common practice: no regulation sets the days)', () => {
  it('an administrator changes them with a reason; the audit names each key old → new; unchanged is refused', async () => {
    const admin = await makeUser('admin');
    const original = await getDueDaySettings();
    const restore = {
      critical: original.critical.days,
      major: original.major.days,
      minor: original.minor.days,
      reason: 'Put back after the test',
    };
    const next = { critical: original.critical.days === 10 ? 11 : 10, major: original.major.days, minor: 45 };
    try {
      await updateDueDays(admin, { ...next, reason: 'Site quality council decision' });
      const now = await getDueDaySettings();
      expect(now.critical).toEqual({ days: next.critical, source: 'setting' });
      expect(now.minor.days).toBe(45);

      const trail = await auditOf('setting', 0);
      const entry = trail.filter((e) => e.action === 'due_days_changed' && e.userId === admin.id).at(-1)!;
      expect(entry.reason).toBe('Site quality council decision');
      expect(changesOf(entry).map((c) => c.field).sort()).toEqual(['due_days_critical', 'due_days_minor']);

      await expect(updateDueDays(admin, { ...next, reason: 'no change' })).rejects.toThrow(/Nothing changed/);
      await expect(updateDueDays(admin, { critical: 0, major: 'x', minor: 400, reason: 'bad' })).rejects.toMatchObject({
        fieldErrors: { critical: [expect.any(String)], major: [expect.any(String)], minor: [expect.any(String)] },
      });
    } finally {
      await updateDueDays(admin, restore).catch(() => undefined);
    }
  });
});
