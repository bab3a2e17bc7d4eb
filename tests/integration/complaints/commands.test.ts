import { randomBytes } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, batches, capas, complaints, deviations, mailOutbox, products, recordLinks, signatures } from '@/db/schema';
import { regulatoryDeadline } from '@/lib/clocks/regulatory';
import {
  closeComplaint,
  completeAssessment,
  completeInvestigation,
  createComplaint,
  linkRecord,
  raiseCapaFromComplaint,
  recordReportSubmitted,
  reopenComplaint,
  saveAssessment,
  saveInvestigation,
  saveResponseDraft,
  sendResponse,
  skipInvestigation,
  startAssessment,
} from '@/lib/complaints/commands';
import { getComplaintDetail, hiddenValue } from '@/lib/complaints/detail';
import { personalFields } from '@/lib/complaints/kind';
import type { IntakeInput } from '@/lib/complaints/schemas';
import { parseComplaintListQuery } from '@/lib/complaints/list-query';
import { listComplaints } from '@/lib/complaints/queries';
import { ConflictError, ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '@/lib/errors';
import { type TestUser, makeUser, testPassword } from '../support/fixtures';

/*
 * Complaint commands against the real database. Sources beside each check: 21 CFR 211.198 (complaint
 * files: every complaint recorded, reviewed by QA, reportability decided, investigated unless the
 * reason for not doing so is written down, the reply kept), 21 CFR 111.560–111.570 (the same for
 * dietary supplements), EU GMP Chapter 8, 21 U.S.C. 379aa-1 (serious adverse events with a dietary
 * supplement reported within 15 business days), 21 CFR 314.81(b)(1) (field alert within 3 working
 * days), 21 CFR 11.10(e) (audit of every change), 11.50 (signature meaning), and data minimisation
 * (GDPR Art. 5(1)(c), EU GMP Annex 11 §12.1: access limited to those who need it) for personal data.
 */

afterAll(closeDb);

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
/** A fixed "now" at the site so the date checks do not depend on the day the tests run. */
const now = new Date('2026-11-20T15:00:00.000Z');

let supplement: { id: number; name: string };
let drug: { id: number; name: string };
let lot: string;
let drugLot: string;
let people: Record<'operator' | 'operator2' | 'supervisor' | 'admin' | 'investigator' | 'approver', TestUser>;

async function makeProduct(regulatoryClass: 'supplement' | 'drug') {
  const code = `IT-${unique()}`.slice(0, 32);
  const name = `Test ${regulatoryClass} ${code}`;
  const [row] = await db
    .insert(products)
    .values({ code, name, strength: '500 mg', capsuleSize: '0', shellMaterial: 'gelatin', regulatoryClass, targetFillMg: '500.00', fillLowerMg: '475.00', fillUpperMg: '525.00' })
    .$returningId();
  return { id: row!.id, name };
}

async function makeBatch(productId: number, manufacturedOn: string) {
  const lotNumber = `IT-${unique()}`.slice(0, 40);
  await db.insert(batches).values({ lotNumber, productId, sizeCapsules: 100_000, unitsShipped: 90_000, status: 'released', manufacturedOn });
  return lotNumber;
}

beforeAll(async () => {
  supplement = await makeProduct('supplement');
  drug = await makeProduct('drug');
  lot = await makeBatch(supplement.id, '2026-10-01');
  drugLot = await makeBatch(drug.id, '2026-10-05');
  const [operator, operator2, supervisor, admin, investigator, approver] = await Promise.all([
    makeUser('operator'),
    makeUser('operator'),
    makeUser('supervisor'),
    makeUser('admin'),
    makeUser('qa_investigator', { title: 'QA Investigator' }),
    makeUser('qa_approver'),
  ]);
  people = { operator, operator2, supervisor, admin, investigator, approver };
});

const intake = (overrides: Record<string, unknown> = {}): IntakeInput => ({
  complainantName: 'Wendeline Quarrystone',
  complainantContact: 'w.quarrystone@customers.example',
  complainantKind: 'consumer' as const,
  channel: 'phone' as const,
  receivedOn: '2026-11-13',
  lot,
  description: 'Several capsules in the bottle were empty: no powder inside at all.',
  unitsAffected: '6',
  personHarmed: 'false',
  samplesReturning: 'on',
  ...overrides,
});

const row = async (id: number) => (await db.select().from(complaints).where(eq(complaints.id, id)))[0]!;
const auditOf = (id: number) =>
  db.select().from(auditEntries).where(and(eq(auditEntries.recordType, 'complaint'), eq(auditEntries.recordId, id))).orderBy(asc(auditEntries.id));

async function fieldErrorsOf(work: Promise<unknown>): Promise<Record<string, string[]>> {
  const err = await work.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(ValidationError);
  return (err as ValidationError).fieldErrors;
}

const assessment = (id: number, version: number, overrides: Record<string, unknown> = {}) => ({
  id,
  version,
  category: 'empty_capsule',
  adverseEvent: 'no',
  reportable: 'no',
  assessmentRationale: 'Empty capsules are a quality defect; nobody was harmed, nothing to report.',
  ...overrides,
});

describe('intake', () => {
  it('lets an operator take a complaint down for a caller; a known lot fills product and batch (21 CFR 211.198(a))', async () => {
    const { record } = await createComplaint(people.operator, intake(), now);
    expect(record.number).toMatch(/^CMP-\d{4}-\d{4,}$/);
    expect(record.status).toBe('received');
    expect(record.productId).toBe(supplement.id);
    expect(record.batchId).not.toBeNull();
    expect(record.lotUnknown).toBe(false);
    expect(record.samplesReturning).toBe(true);
    // 21 CFR 11.10(e): the creation is audited with every field.
    const [created] = await auditOf(record.id);
    expect(created!.action).toBe('create');
    expect(JSON.parse(created!.changes).map((c: { field: string }) => c.field)).toContain('complainantName');
    // 21 CFR 211.198(a): the complaint reaches QA (notice to the QA investigators, without personal data).
    const mails = await db.select().from(mailOutbox).where(and(eq(mailOutbox.recordType, 'complaint'), eq(mailOutbox.recordId, record.id)));
    expect(mails.length).toBeGreaterThan(0);
    for (const m of mails) expect(m.textBody).not.toContain('Quarrystone');
  });

  it('keeps a lot the batch records do not know, flagged, and then asks for the product (common practice)', async () => {
    const errors = await fieldErrorsOf(createComplaint(people.operator, intake({ lot: 'NOT-A-LOT-1' }), now));
    expect(errors.productId?.[0]).toMatch(/not in the batch records/);
    const { record } = await createComplaint(people.operator, intake({ lot: 'NOT-A-LOT-1', productId: String(supplement.id) }), now);
    expect(record.lotUnknown).toBe(true);
    expect(record.lotAsReported).toBe('NOT-A-LOT-1');
    expect(record.batchId).toBeNull();
  });

  it('refuses a received date in the future or before the lot was made, beside the field (issue rule; ALCOA+ accurate)', async () => {
    expect((await fieldErrorsOf(createComplaint(people.operator, intake({ receivedOn: '2026-11-21' }), now))).receivedOn?.[0]).toMatch(/future/);
    expect((await fieldErrorsOf(createComplaint(people.operator, intake({ receivedOn: '2026-09-30' }), now))).receivedOn?.[0]).toMatch(/was made on 2026-10-01/);
  });

  it('refuses a product that does not match the known lot (common practice)', async () => {
    const errors = await fieldErrorsOf(createComplaint(people.operator, intake({ productId: String(drug.id) }), now));
    expect(errors.productId?.[0]).toContain(supplement.name);
  });

  it('asks how a person was harmed when they were (21 CFR 211.198(b)(1))', async () => {
    const errors = await fieldErrorsOf(createComplaint(people.operator, intake({ personHarmed: 'on' }), now));
    expect(errors.harmDescription).toBeDefined();
  });

  it('refuses intake by the administrator, who takes no GMP decision (Annex 11 §12.1, common practice)', async () => {
    await expect(createComplaint(people.admin, intake(), now)).rejects.toBeInstanceOf(ForbiddenError);
  });
});

describe('personal data stays with QA (GDPR Art. 5(1)(c), Annex 11 §12.1)', () => {
  it('leaves the complainant out of every DTO a non-QA role can reach', async () => {
    const { record } = await createComplaint(people.operator, intake({ personHarmed: 'on', harmDescription: 'Felt dizzy after taking two.' }), now);
    for (const key of [...personalFields, 'complainantName', 'complainantContact']) expect(record).not.toHaveProperty(key);
    expect(JSON.stringify(record)).not.toContain('Quarrystone');

    for (const viewer of [people.operator, people.supervisor, people.admin]) {
      const detail = await getComplaintDetail(record.id, viewer);
      expect(detail.personal).toBeNull();
      const json = JSON.stringify(detail);
      expect(json).not.toContain('Quarrystone');
      expect(json).not.toContain('customers.example');
      expect(json).not.toContain('dizzy');
      const page = await listComplaints(parseComplaintListQuery({ pageSize: '100' }), viewer);
      expect(JSON.stringify(page)).not.toContain('Quarrystone');
    }
    // The administrator reads the audit trail, with the personal values hidden.
    const adminView = await getComplaintDetail(record.id, people.admin);
    const created = adminView.audit!.find((e) => e.action === 'create')!;
    expect(created.changes.find((c) => c.field === 'complainantName')!.to).toBe(hiddenValue);

    const qa = await getComplaintDetail(record.id, people.investigator);
    expect(qa.personal).toMatchObject({ complainantName: 'Wendeline Quarrystone', harmDescription: 'Felt dizzy after taking two.' });
  });

  it('shows an operator only the complaints they entered (user B cannot read A’s complaint)', async () => {
    const { record } = await createComplaint(people.operator, intake(), now);
    await expect(getComplaintDetail(record.id, people.operator2)).rejects.toBeInstanceOf(NotFoundError);
    const page = await listComplaints(parseComplaintListQuery({ pageSize: '100' }), people.operator2);
    expect(page.rows.map((r) => r.id)).not.toContain(record.id);
    const own = await listComplaints(parseComplaintListQuery({ pageSize: '100' }), people.operator);
    expect(own.rows.map((r) => r.id)).toContain(record.id);
  });
});

describe('assessment and reportability', () => {
  async function assessed(overrides: Record<string, string> = {}, at: Date = now) {
    const { record } = await createComplaint(people.operator, intake(overrides), at);
    const started = await startAssessment(people.investigator, { id: record.id, version: record.version });
    return started.record;
  }

  it('lets only a QA investigator start the assessment, who becomes the owner (21 CFR 111.560(a)(1))', async () => {
    const { record } = await createComplaint(people.operator, intake(), now);
    await expect(startAssessment(people.supervisor, { id: record.id, version: record.version })).rejects.toBeInstanceOf(ForbiddenError);
    await expect(startAssessment(people.approver, { id: record.id, version: record.version })).rejects.toBeInstanceOf(ForbiddenError);
    const { record: started } = await startAssessment(people.investigator, { id: record.id, version: record.version });
    expect(started.status).toBe('assessment');
    expect(started.ownerId).toBe(people.investigator.id);
  });

  it('stores the 15-business-day deadline of a serious adverse event with a supplement (21 U.S.C. 379aa-1(c)(1))', async () => {
    const c = await assessed({ personHarmed: 'on', harmDescription: 'Admitted to hospital overnight with palpitations.' });
    const refused = await fieldErrorsOf(
      saveAssessment(people.investigator, assessment(c.id, c.version, { category: 'suspected_adverse_reaction', adverseEvent: 'yes', seriousAdverseEvent: 'yes', reportable: 'no' })),
    );
    expect(refused.reportable?.[0]).toMatch(/379aa-1/);
    const { record } = await saveAssessment(
      people.investigator,
      assessment(c.id, c.version, { category: 'suspected_adverse_reaction', adverseEvent: 'yes', seriousAdverseEvent: 'yes', reportable: 'yes' }),
    );
    expect(record.reportKind).toBe('dietary_supplement_sae');
    // 2026-11-13 (Friday) + 15 business days, Veterans Day is before it and Thanksgiving (26 Nov) skipped: 5 U.S.C. 6103.
    expect(record.reportDueOn).toBe(regulatoryDeadline('dietary_supplement_sae', '2026-11-13', '2026-11-13').deadline);
    expect(record.reportDueOn).toBe('2026-12-07');
    const detail = await getComplaintDetail(record.id, people.investigator, db, now);
    expect(detail.report).toMatchObject({ dueOn: '2026-12-07', tone: 'ok' });
  });

  it('stores the 3-working-day field alert deadline for a drug (21 CFR 314.81(b)(1))', async () => {
    const c = await assessed({ lot: drugLot, receivedOn: '2026-11-25' }, new Date('2026-11-30T15:00:00.000Z'));
    const { record } = await saveAssessment(people.investigator, assessment(c.id, c.version, { category: 'foreign_matter', reportable: 'yes' }));
    expect(record.reportKind).toBe('field_alert_report');
    // Wednesday 25 Nov 2026 + 3 working days skips Thanksgiving (Thu 26) and the weekend: Tuesday 1 Dec.
    expect(record.reportDueOn).toBe('2026-12-01');
  });

  it('refuses a stale version without overwriting anything (optimistic locking, common practice)', async () => {
    const c = await assessed();
    await saveAssessment(people.investigator, assessment(c.id, c.version));
    await expect(saveAssessment(people.investigator, assessment(c.id, c.version, { assessmentRationale: 'A different rationale typed in another tab.' }))).rejects.toBeInstanceOf(
      ConflictError,
    );
    expect((await row(c.id)).assessmentRationale).toMatch(/quality defect/);
  });

  it('refuses a category outside the catalogue and an unanswered seriousness (21 CFR 314.80(a))', async () => {
    const c = await assessed();
    expect((await fieldErrorsOf(saveAssessment(people.investigator, assessment(c.id, c.version, { category: 'made_up' })))).category).toBeDefined();
    expect((await fieldErrorsOf(saveAssessment(people.investigator, assessment(c.id, c.version, { adverseEvent: 'yes' })))).seriousAdverseEvent).toBeDefined();
  });

  it('skips the investigation only with a justification and a signature when no defect was found (21 CFR 211.198(b)(2))', async () => {
    const c = await assessed();
    const { record: withDefect } = await saveAssessment(people.investigator, assessment(c.id, c.version));
    await expect(
      skipInvestigation(people.investigator, { id: c.id, version: withDefect.version, reason: 'Nothing to look at.', password: testPassword }),
    ).rejects.toBeInstanceOf(InvalidTransitionError);
    const { record: noDefect } = await saveAssessment(
      people.investigator,
      assessment(c.id, withDefect.version, { category: 'no_defect_found', assessmentRationale: 'The returned capsules were checked and are within specification.' }),
    );
    const skipped = await skipInvestigation(people.investigator, {
      id: c.id,
      version: noDefect.version,
      reason: 'Returned capsules examined: full, intact, within fill weight; no defect is possible.',
      password: testPassword,
    });
    expect(skipped.record.status).toBe('response');
    expect(skipped.record.investigationSkipReason).toMatch(/no defect is possible/);
    expect(skipped.record.reportabilityDecidedBy).toBe(people.investigator.id);
    expect(skipped.signature?.meaning).toBe('reportability_decided');
  });
});

describe('from investigation to a signed, answered, closed complaint', () => {
  it('runs the whole lifecycle with links to a deviation and a CAPA, the letter sent and kept (21 CFR 211.198(b))', async () => {
    const { record: received } = await createComplaint(people.operator, intake(), now);
    let v = (await startAssessment(people.investigator, { id: received.id, version: received.version })).record.version;
    v = (await saveAssessment(people.investigator, assessment(received.id, v))).record.version;
    // 21 CFR 11.50: the decision is signed with its meaning.
    const signedAssessment = await completeAssessment(people.investigator, { id: received.id, version: v, password: testPassword });
    expect(signedAssessment.record.status).toBe('investigation');
    expect(signedAssessment.signature?.meaning).toBe('reportability_decided');
    v = signedAssessment.record.version;

    await expect(completeInvestigation(people.investigator, { id: received.id, version: v, password: testPassword })).rejects.toBeInstanceOf(InvalidTransitionError);
    v = (
      await saveInvestigation(people.investigator, {
        id: received.id,
        version: v,
        retainedSamplesChecked: 'yes',
        retainedSamplesNote: 'Retained samples of the lot: 2 empty in 500 counted.',
        investigationSummary: 'Empty capsules traced to a blocked dosing disc bore on the filler.',
      })
    ).record.version;

    const devNumber = `DEV-2099-${String(Math.floor(Math.random() * 90_000) + 10_000)}`;
    const [dev] = await db
      .insert(deviations)
      .values({ number: devNumber, status: 'investigation', title: 'Empty capsules', whatHappened: 'Empty capsules found at AQL inspection.', raisedBy: people.operator.id, occurredAt: now })
      .$returningId();
    const unknownRef = await fieldErrorsOf(linkRecord(people.investigator, { id: received.id, version: v, target: 'deviation', reference: 'DEV-2099-00000' }));
    expect(unknownRef.reference?.[0]).toMatch(/No deviation/);
    v = (await linkRecord(people.investigator, { id: received.id, version: v, target: 'deviation', reference: devNumber.toLowerCase() })).record.version;
    const again = await fieldErrorsOf(linkRecord(people.investigator, { id: received.id, version: v, target: 'deviation', reference: devNumber }));
    expect(again.reference?.[0]).toMatch(/already linked/);

    await expect(
      raiseCapaFromComplaint(people.supervisor, { id: received.id, version: v, title: 'Blocked dosing bores', problemStatement: 'Empty capsules reached a customer.', ownerId: people.investigator.id }),
    ).rejects.toBeInstanceOf(ForbiddenError);
    const raised = await raiseCapaFromComplaint(people.investigator, {
      id: received.id,
      version: v,
      title: 'Blocked dosing bores',
      problemStatement: 'Empty capsules reached a customer.',
      ownerId: people.investigator.id,
    });
    v = raised.record.version;
    const [capa] = await db.select().from(capas).where(eq(capas.id, raised.capa.id));
    expect(capa).toMatchObject({ sourceType: 'complaint', sourceId: received.id, status: 'proposed' });
    const links = await db.select().from(recordLinks).where(and(eq(recordLinks.fromType, 'complaint'), eq(recordLinks.fromId, received.id)));
    expect(links.map((l) => `${l.toType}:${l.toId}:${l.relation}`).sort()).toEqual(
      [`capa:${raised.capa.id}:raised_capa`, `deviation:${dev!.id}:related_deviation`].sort(),
    );

    const investigated = await completeInvestigation(people.investigator, { id: received.id, version: v, password: testPassword });
    expect(investigated.record.status).toBe('response');
    expect(investigated.signature?.meaning).toBe('investigation_complete');
    v = investigated.record.version;

    // The operator who took it down cannot write the answer, and nobody closes before it is sent.
    await expect(saveResponseDraft(people.operator, { id: received.id, version: v, letter: '<p>Hello</p>' })).rejects.toBeInstanceOf(ForbiddenError);
    await expect(saveResponseDraft(people.operator2, { id: received.id, version: v, letter: '<p>Hello</p>' })).rejects.toBeInstanceOf(NotFoundError);
    await expect(closeComplaint(people.approver, { id: received.id, version: v, password: testPassword })).rejects.toBeInstanceOf(InvalidTransitionError);

    v = (await saveResponseDraft(people.investigator, { id: received.id, version: v, letter: '<p>Dear Ms Quarrystone,</p><p>[Say what we are doing about it.]</p>' })).record.version;
    const placeholder = await fieldErrorsOf(sendResponse(people.investigator, { id: received.id, version: v, channel: 'email' }));
    expect(placeholder.letter?.[0]).toMatch(/bracketed/);
    const letter = '<p>Dear Ms Quarrystone,</p><p>We found a blocked bore on the filler and corrected it.</p><script>alert(1)</script>';
    v = (await saveResponseDraft(people.investigator, { id: received.id, version: v, letter })).record.version;
    const sent = await sendResponse(people.investigator, { id: received.id, version: v, channel: 'email' });
    expect(sent.record.responseChannel).toBe('email');
    v = sent.record.version;
    const stored = await row(received.id);
    expect(stored.responseSentText).toContain('blocked bore');
    expect(stored.responseSentText).not.toContain('<script');
    const [outgoing] = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.template, 'complaint_response'), eq(mailOutbox.recordId, received.id)));
    expect(outgoing!.toAddress).toBe('w.quarrystone@customers.example');
    expect(outgoing!.textBody).toContain('blocked bore');
    // The letter as sent is audited (21 CFR 11.10(e)) and cannot be changed afterwards.
    const sendAudit = (await auditOf(received.id)).find((a) => a.action === 'send_response')!;
    expect(JSON.parse(sendAudit.changes).map((c: { field: string }) => c.field)).toContain('responseSentText');
    await expect(saveResponseDraft(people.investigator, { id: received.id, version: v, letter: '<p>Changed</p>' })).rejects.toBeInstanceOf(InvalidTransitionError);

    await expect(closeComplaint(people.investigator, { id: received.id, version: v, password: testPassword })).rejects.toBeInstanceOf(ForbiddenError);
    const closed = await closeComplaint(people.approver, { id: received.id, version: v, password: testPassword });
    expect(closed.record.status).toBe('closed');
    expect(closed.signature?.meaning).toBe('approved');
    const sigs = await db.select().from(signatures).where(and(eq(signatures.recordType, 'complaint'), eq(signatures.recordId, received.id)));
    expect(sigs.map((s) => s.meaning)).toEqual(['reportability_decided', 'investigation_complete', 'approved']);

    // EU GMP 8.14: reopened with a reason; a new answer is needed before it closes again.
    await expect(reopenComplaint(people.supervisor, { id: received.id, version: closed.record.version, to: 'investigation', reason: 'More reports' })).rejects.toBeInstanceOf(
      ForbiddenError,
    );
    const reopened = await reopenComplaint(people.approver, {
      id: received.id,
      version: closed.record.version,
      to: 'investigation',
      reason: 'A second customer reported empty capsules from the same lot.',
    });
    expect(reopened.record).toMatchObject({ status: 'investigation', responseSentAt: null, closedAt: null });
    expect(reopened.record.reopenReason).toMatch(/second customer/);
  });

  it('refuses sending by e-mail when the contact is a telephone number, and records a posted letter instead', async () => {
    const { record } = await createComplaint(people.operator, intake({ complainantContact: '+1 555 0100 (evenings)' }), now);
    let v = (await startAssessment(people.investigator, { id: record.id, version: record.version })).record.version;
    v = (await saveAssessment(people.investigator, assessment(record.id, v, { category: 'no_defect_found' }))).record.version;
    v = (await skipInvestigation(people.investigator, { id: record.id, version: v, reason: 'Capsules checked; none empty.', password: testPassword })).record.version;
    v = (await saveResponseDraft(people.approver, { id: record.id, version: v, letter: '<p>Dear caller, we checked the capsules.</p>' })).record.version;
    expect((await fieldErrorsOf(sendResponse(people.approver, { id: record.id, version: v, channel: 'email' }))).channel?.[0]).toMatch(/not an e-mail address/);
    const posted = await sendResponse(people.approver, { id: record.id, version: v, channel: 'post' });
    expect(posted.record.responseChannel).toBe('post');
    expect(posted.record.responseSentAt).not.toBeNull();
  });

  it('records the date the report was submitted, not before receipt and not in the future', async () => {
    const { record } = await createComplaint(people.operator, intake({ lot: drugLot, receivedOn: '2026-11-16' }), now);
    let v = (await startAssessment(people.investigator, { id: record.id, version: record.version })).record.version;
    v = (await saveAssessment(people.investigator, assessment(record.id, v, { category: 'foreign_matter', reportable: 'yes' }))).record.version;
    v = (await completeAssessment(people.investigator, { id: record.id, version: v, password: testPassword })).record.version;
    expect((await fieldErrorsOf(recordReportSubmitted(people.investigator, { id: record.id, version: v, submittedOn: '2026-11-10' }, now))).submittedOn).toBeDefined();
    expect((await fieldErrorsOf(recordReportSubmitted(people.investigator, { id: record.id, version: v, submittedOn: '2026-11-21' }, now))).submittedOn).toBeDefined();
    const done = await recordReportSubmitted(people.investigator, { id: record.id, version: v, submittedOn: '2026-11-18' }, now);
    expect(done.record.reportSubmittedAt).toBe('2026-11-18T00:00:00.000Z');
    const detail = await getComplaintDetail(record.id, people.supervisor, db, now);
    expect(detail.report).toMatchObject({ tone: 'done', text: 'submitted 2026-11-18' });
  });
});
