import { randomBytes } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '@/db/client';
import { deviations, mailOutbox, users } from '@/db/schema';
import { runRemindersOnce } from '@/lib/reminders/run';
import { makeUser } from '../support/fixtures';

/*
 * The reminder sweep against MariaDB: due-soon once per due date, overdue once per site day, however
 * often and from however many workers it runs (issue 5: "reminders for due and overdue items go out
 * once a day without duplicates"; the timing itself is common practice). The demo site's time zone
 * is America/Chicago (settings.site_time_zone), UTC-6 in December (IANA tz database).
 */

async function makeOpenDeviation(ownerId: number, dueOn: string, status: 'investigation' | 'closed' = 'investigation') {
  const [row] = await db
    .insert(deviations)
    .values({
      number: `IT-${randomBytes(5).toString('hex').toUpperCase()}`,
      status,
      title: 'Broken bodies after the ring change',
      whatHappened: 'Broken capsule bodies at the outlet.',
      raisedBy: ownerId,
      ownerId,
      investigatorId: ownerId,
      occurredAt: new Date('2026-11-20T10:00:00Z'),
      reportedAt: new Date('2026-11-20T10:30:00Z'),
      dueAt: new Date(`${dueOn}T00:00:00Z`),
    })
    .$returningId();
  return row!.id;
}

const mailFor = (userId: number) =>
  db
    .select({ key: mailOutbox.dedupeKey, template: mailOutbox.template, subject: mailOutbox.subject, recordId: mailOutbox.recordId })
    .from(mailOutbox)
    .where(eq(mailOutbox.toUserId, userId));

describe('runRemindersOnce', () => {
  it('queues each due-soon reminder once per due date and each overdue notice once per site day', async () => {
    const owner = await makeUser('qa_investigator');
    const soon = await makeOpenDeviation(owner.id, '2030-03-12');
    const late = await makeOpenDeviation(owner.id, '2030-03-08');
    const far = await makeOpenDeviation(owner.id, '2030-03-20');
    await makeOpenDeviation(owner.id, '2030-03-01', 'closed');

    // 15:00 UTC on 10 March 2030 is 10:00 in Chicago (CDT from 10 March 2030, UTC-5).
    const day1 = new Date('2030-03-10T15:00:00Z');
    await runRemindersOnce({ now: day1 });
    await Promise.all([runRemindersOnce({ now: day1 }), runRemindersOnce({ now: day1 })]);
    let mail = await mailFor(owner.id);
    expect(mail.map((m) => [m.recordId, m.template]).sort()).toEqual(
      [
        [late, 'reminder_overdue'],
        [soon, 'reminder_due_soon'],
      ].sort(),
    );
    expect(mail.find((m) => m.recordId === soon)!.subject).toMatch(/is due in 2 days$/);
    expect(mail.find((m) => m.recordId === late)!.subject).toMatch(/\(2 days overdue\)$/);
    expect(mail.some((m) => m.recordId === far)).toBe(false);

    // 03:00 UTC on 11 March is still 10 March in Chicago: nothing new.
    await runRemindersOnce({ now: new Date('2030-03-11T03:00:00Z') });
    expect(await mailFor(owner.id)).toHaveLength(2);

    // The next site day: a second overdue notice, and the due-soon reminder is not repeated.
    await runRemindersOnce({ now: new Date('2030-03-11T15:00:00Z') });
    mail = await mailFor(owner.id);
    expect(mail.filter((m) => m.recordId === late)).toHaveLength(2);
    expect(mail.filter((m) => m.recordId === soon)).toHaveLength(1);
  });

  it('tells nobody whose account is deactivated', async () => {
    const owner = await makeUser('qa_investigator');
    await makeOpenDeviation(owner.id, '2030-05-01');
    await db.update(users).set({ active: false }).where(eq(users.id, owner.id));
    await runRemindersOnce({ now: new Date('2030-05-03T15:00:00Z') });
    expect(await mailFor(owner.id)).toHaveLength(0);
    expect(
      await db.select().from(mailOutbox).where(and(eq(mailOutbox.toUserId, owner.id), eq(mailOutbox.template, 'reminder_overdue'))),
    ).toHaveLength(0);
  });
});
