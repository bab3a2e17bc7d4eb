import { randomBytes } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { batches, mailOutbox, products } from '@/db/schema';
import { createComplaint, recordReportSubmitted, saveAssessment, startAssessment, completeAssessment } from '@/lib/complaints/commands';
import { complaintReportSource } from '@/lib/complaints/report-reminders';
import { runRemindersOnce } from '@/lib/reminders/run';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * Report deadlines earn e-mail reminders to the complaint's owner until the report is recorded as
 * submitted: 21 U.S.C. 379aa-1(c)(1) (15 business days for a serious adverse event with a dietary
 * supplement); the reminder schedule (three days before, then daily once late) is common practice,
 * the same as every other due date (lib/reminders/rules.ts).
 */

afterAll(closeDb);

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();

describe('report deadline reminders', () => {
  it('reminds the owner before the deadline and stops once the report is submitted', async () => {
    const code = `IT-${unique()}`.slice(0, 32);
    const [p] = await db
      .insert(products)
      .values({ code, name: `Test supplement ${code}`, strength: '1 g', capsuleSize: '0', shellMaterial: 'hpmc', regulatoryClass: 'supplement', targetFillMg: '500.00', fillLowerMg: '475.00', fillUpperMg: '525.00' })
      .$returningId();
    const lot = `IT-${unique()}`.slice(0, 40);
    await db.insert(batches).values({ lotNumber: lot, productId: p!.id, sizeCapsules: 50_000, unitsShipped: 40_000, status: 'released', manufacturedOn: '2026-10-01' });
    const [operator, investigator] = await Promise.all([makeUser('operator'), makeUser('qa_investigator')]);
    const now = new Date('2026-11-20T15:00:00.000Z');
    const { record } = await createComplaint(
      operator,
      {
        complainantName: 'Aurelio Thistlewood',
        complainantContact: 'a.thistlewood@customers.example',
        complainantKind: 'consumer',
        channel: 'phone',
        receivedOn: '2026-11-13',
        lot,
        description: 'Felt faint after the first dose and was taken to hospital.',
        personHarmed: 'on',
        harmDescription: 'Kept in hospital overnight for observation.',
      },
      now,
    );
    let v = (await startAssessment(investigator, { id: record.id, version: record.version })).record.version;
    v = (
      await saveAssessment(investigator, {
        id: record.id,
        version: v,
        category: 'suspected_adverse_reaction',
        adverseEvent: 'yes',
        seriousAdverseEvent: 'yes',
        reportable: 'yes',
        assessmentRationale: 'Hospital stay after use: a serious adverse event, reportable within 15 business days.',
      })
    ).record.version;
    v = (await completeAssessment(investigator, { id: record.id, version: v, password: testPassword })).record.version;

    // Due 2026-12-07; on 2026-12-04 it is within the three-day window.
    const items = await complaintReportSource(db, new Date('2026-12-07T00:00:00.000Z'), null, 500);
    const item = items.find((i) => i.recordId === record.id);
    expect(item).toMatchObject({ recipient: { id: investigator.id }, number: record.number, path: `/complaints/${record.id}` });
    expect(item!.dueAt.toISOString()).toBe('2026-12-07T00:00:00.000Z');
    expect(item!.title).toContain('379aa-1');

    await runRemindersOnce({ now: new Date('2026-12-04T15:00:00.000Z') });
    const queued = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'complaint'), eq(mailOutbox.recordId, record.id), eq(mailOutbox.template, 'reminder_due_soon')));
    expect(queued).toHaveLength(1);
    expect(queued[0]!.toAddress).toBe(investigator.email);
    expect(queued[0]!.textBody).not.toContain('Thistlewood');

    await recordReportSubmitted(investigator, { id: record.id, version: v, submittedOn: '2026-11-27' }, new Date('2026-11-30T15:00:00.000Z'));
    const after = await complaintReportSource(db, new Date('2026-12-31T00:00:00.000Z'), null, 500);
    expect(after.map((i) => i.recordId)).not.toContain(record.id);
  });
});
