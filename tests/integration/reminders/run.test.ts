import { randomBytes } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '@/db/client';
import { capaActions, capas, deviations, mailOutbox, stateHistory, users } from '@/db/schema';
import { openDueEffectivenessChecks } from '@/lib/capa/effectiveness-due';
import { runRemindersOnce } from '@/lib/reminders/run';
import { makeMachine, makeUser } from '../support/fixtures';

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

async function makeCapa(ownerId: number, values: Partial<typeof capas.$inferInsert>) {
  const [row] = await db
    .insert(capas)
    .values({
      number: `IT-${randomBytes(5).toString('hex').toUpperCase()}`,
      title: 'Replace the worn body plate',
      sourceType: 'trend',
      problemStatement: 'Broken bodies recur on filler 2.',
      ownerId,
      createdBy: ownerId,
      ...values,
    })
    .$returningId();
  return row!.id;
}

describe('CAPA reminders', () => {
  it("reminds each action's owner of an open action of the current round, and the CAPA's owner of the CAPA", async () => {
    const owner = await makeUser('qa_investigator');
    const doer = await makeUser('operator');
    const capaId = await makeCapa(owner.id, { status: 'implementation', planRound: 2, dueAt: new Date('2030-06-12T00:00:00Z') });
    const base = { capaId, kind: 'corrective' as const, category: 'procedure', ownerId: doer.id, createdBy: owner.id };
    await db.insert(capaActions).values([
      { ...base, round: 2, description: 'Add a bore check to the changeover sheet', dueAt: new Date('2030-06-09T00:00:00Z') },
      { ...base, round: 1, description: 'An action of the earlier round', dueAt: new Date('2030-06-01T00:00:00Z') },
      { ...base, round: 2, description: 'Done already', dueAt: new Date('2030-06-01T00:00:00Z'), completedAt: new Date('2030-06-02T00:00:00Z') },
    ]);
    await runRemindersOnce({ now: new Date('2030-06-10T15:00:00Z') });
    const toDoer = await mailFor(doer.id);
    expect(toDoer.map((m) => m.template)).toEqual(['reminder_overdue']);
    expect(toDoer[0]!.subject).toMatch(/^Overdue: CAPA action IT-/);
    const toOwner = await mailFor(owner.id);
    expect(toOwner.map((m) => m.template)).toEqual(['reminder_due_soon']);
  });
});

describe('openDueEffectivenessChecks', () => {
  it('opens the check once the criterion has run, in the owner\'s name with the reason, and mails the reviewers (ICH Q10 3.2.2; common practice)', async () => {
    const owner = await makeUser('qa_investigator');
    const machine = await makeMachine();
    const completed = new Date('2030-07-01T12:00:00Z');
    const capaId = await makeCapa(owner.id, {
      status: 'implementation',
      actionsPlanned: 1,
      actionsOpen: 0,
      actionsCompletedAt: completed,
      recurrenceCriterion: JSON.stringify({ machineId: machine.id, days: 10 }),
    });
    // The CAPA's rules count its actions from the actions themselves: one, completed by an operator.
    const doer = await makeUser('operator');
    await db.insert(capaActions).values({
      capaId,
      kind: 'corrective',
      category: 'machine_setting',
      description: 'Re-set the vacuum on the separating station',
      ownerId: doer.id,
      createdBy: owner.id,
      round: 1,
      dueAt: completed,
      completedAt: completed,
      completedBy: doer.id,
    });
    expect((await openDueEffectivenessChecks({ now: new Date('2030-07-05T12:00:00Z') })).opened.map((o) => o.id)).not.toContain(capaId);
    const sweep = await openDueEffectivenessChecks({ now: new Date('2030-07-12T12:00:00Z') });
    expect(sweep.opened.map((o) => o.id)).toContain(capaId);
    const [row] = await db.select().from(capas).where(eq(capas.id, capaId));
    expect(row!.status).toBe('effectiveness_check');
    const [history] = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'capa'), eq(stateHistory.recordId, capaId)));
    expect(history).toMatchObject({ event: 'open_effectiveness_check', userId: owner.id });
    expect(history!.comment).toMatch(/^Opened by the system: the criterion's period has run/);
    const reviewMail = await db.select().from(mailOutbox).where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, capaId)));
    expect(reviewMail.length).toBeGreaterThan(0);
    // Running again changes nothing.
    expect((await openDueEffectivenessChecks({ now: new Date('2030-07-13T12:00:00Z') })).opened.map((o) => o.id)).not.toContain(capaId);
  });
});
