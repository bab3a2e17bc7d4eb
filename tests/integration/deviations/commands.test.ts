import { randomBytes } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, batches, deviationBatches, deviations, mailOutbox, products, signatures } from '@/db/schema';
import {
  approveDeviation,
  assignInvestigation,
  cancelDeviation,
  closeMinor,
  createDraft,
  recordTriage,
  returnForRework,
  startTriage,
  submitDeviation,
  submitForApproval,
  updateDraft,
} from '@/lib/deviations/commands';
import type { DeviationDto } from '@/lib/deviations/kind';
import { saveInvestigation } from '@/lib/deviations/investigation';
import { ConflictError, ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '@/lib/errors';
import type { RecordActor } from '@/lib/records/kind';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * Deviation commands against the real database. Sources beside each check: 21 CFR 211.192
 * (unexplained discrepancies investigated, extended to other batches that may be affected, written
 * record), 211.22(a) (the quality unit approves or rejects), 11.50 (signature manifestation: name,
 * meaning), 11.10(e) (audit trail of every change), and common practice where noted.
 */

afterAll(closeDb);

let productId: Promise<number> | undefined;

async function makeBatch(): Promise<number> {
  productId ??= db
    .select({ id: products.id })
    .from(products)
    .limit(1)
    .then((r) => r[0]!.id);
  const lotNumber = `IT-LOT-${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
  const [row] = await db
    .insert(batches)
    .values({ lotNumber, productId: await productId, sizeCapsules: 200_000, manufacturedOn: '2026-11-20' })
    .$returningId();
  return row!.id;
}

const batchStatus = async (id: number) => (await db.select().from(batches).where(eq(batches.id, id)))[0]!.status;
const deviation = async (id: number) => (await db.select().from(deviations).where(eq(deviations.id, id)))[0]!;
const auditOf = (recordType: 'deviation' | 'batch', id: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.recordId, id)))
    .orderBy(asc(auditEntries.id));

const draftInput = (heldBatchIds: number[]) => ({
  title: 'Broken capsule bodies at the filler outfeed',
  whatHappened: 'Operator saw split bodies in the outfeed chute during the 10:00 check.',
  occurredAt: new Date(Date.now() - 3_600_000),
  batchId: heldBatchIds[0],
  immediateActions: 'Line stopped, capsules since the last good check segregated.',
  lineStopped: true,
  capsulesSegregated: true,
  affectedCount: 340,
  heldBatchIds,
});

async function reportedDeviation() {
  const operator = await makeUser('operator');
  const batchId = await makeBatch();
  const draft = await createDraft(operator, draftInput([batchId]));
  const submitted = await submitDeviation(operator, { id: draft.record.id, version: draft.record.version });
  return { operator, batchId, record: submitted.record };
}

/** A deviation in approval: raised by an operator, triaged by one investigator, investigated by another. */
/** The conclusions the "investigation complete" signature requires (lib/deviations/investigation.ts). */
async function completeInvestigation(investigator: RecordActor, r: DeviationDto): Promise<DeviationDto> {
  const saved = await saveInvestigation(investigator, {
    id: r.id,
    version: r.version,
    investigationReport: '<p>Bodies broke at the pin plate; the bore on segment 3 was damaged.</p>',
    rootCauseCategory: 'machine',
    rootCause: 'Damaged body plate bore.',
    productImpact: 'Broken bodies removed by 100 % inspection; fill weights within limits.',
    capaRequired: false,
  });
  return saved.record;
}

async function deviationInApproval() {
  const { operator, batchId, record } = await reportedDeviation();
  const [triager, investigator, approver] = await Promise.all([
    makeUser('qa_investigator'),
    makeUser('qa_investigator'),
    makeUser('qa_approver'),
  ]);
  let r = (await startTriage(triager, { id: record.id, version: record.version })).record;
  r = (
    await recordTriage(triager, {
      id: r.id,
      version: r.version,
      classification: 'major',
      severity: 7,
      occurrence: 4,
      detection: 5,
      classificationReason: 'Broken bodies can leak fill; no patient contact yet.',
      investigatorId: investigator.id,
      dueAt: new Date('2026-12-30T00:00:00Z'),
    })
  ).record;
  r = (await assignInvestigation(triager, { id: r.id, version: r.version })).record;
  r = await completeInvestigation(investigator, r);
  const signed = await submitForApproval(investigator, { id: r.id, version: r.version, password: testPassword });
  return { operator, batchId, triager, investigator, approver, submitted: signed, record: signed.record };
}

describe('raising a deviation', () => {
  it('gives a draft no number; submitting numbers it, reports it and puts the held batch on hold, audited', async () => {
    const operator = await makeUser('operator');
    const batchId = await makeBatch();
    const draft = await createDraft(operator, draftInput([batchId]));
    // Common practice: numbers are given on submission so abandoned drafts leave no gaps in the register.
    expect(draft.record).toMatchObject({ status: 'draft', number: null, raisedBy: operator.id, batchId });
    expect(draft.allowedEvents.map((e) => e.type)).toEqual(['submit', 'discard']);
    // The hold takes effect when the deviation is reported, not while it is a draft (common practice).
    expect(await batchStatus(batchId)).toBe('in_process');

    const out = await submitDeviation(operator, { id: draft.record.id, version: draft.record.version });
    const year = new Date().getUTCFullYear();
    expect(out.record.number).toMatch(new RegExp(`^DEV-${year}-\\d{4}$`));
    expect(out.record.status).toBe('reported');
    expect(out.record.reportedAt).not.toBeNull();
    // 21 CFR 211.192: other batches that may be affected are part of the investigation — held until decided.
    expect(await batchStatus(batchId)).toBe('on_hold');

    // 21 CFR 11.10(e): creation, submission and the batch hold each leave an audit entry.
    const entries = await auditOf('deviation', draft.record.id);
    expect(entries.map((e) => e.action)).toEqual(['create', 'submit']);
    expect(JSON.parse(entries[1]!.changes)).toEqual(
      expect.arrayContaining([
        { field: 'status', from: 'draft', to: 'reported' },
        { field: 'number', from: null, to: out.record.number },
      ]),
    );
    const batchAudit = await auditOf('batch', batchId);
    expect(batchAudit).toHaveLength(1);
    expect(batchAudit[0]).toMatchObject({ action: 'hold', userId: operator.id });
    expect(JSON.parse(batchAudit[0]!.changes)).toEqual([{ field: 'status', from: 'in_process', to: 'on_hold' }]);
    expect(batchAudit[0]!.reason).toContain(out.record.number!);
  });

  it('lets the author edit their draft, auditing each changed field and the held batches', async () => {
    const operator = await makeUser('operator');
    const [first, second] = await Promise.all([makeBatch(), makeBatch()]);
    const draft = await createDraft(operator, draftInput([first]));
    const out = await updateDraft(operator, {
      ...draftInput([first, second]),
      id: draft.record.id,
      version: draft.record.version,
      affectedCount: 410,
    });
    expect(out.record).toMatchObject({ version: draft.record.version + 1, affectedCount: 410 });
    // 21 CFR 11.10(e): old and new value of each changed field.
    const [, edit] = await auditOf('deviation', draft.record.id);
    expect(edit!.action).toBe('update_draft');
    expect(JSON.parse(edit!.changes)).toEqual(
      expect.arrayContaining([
        { field: 'affectedCount', from: 340, to: 410 },
        { field: 'heldBatchIds', from: [first], to: [first, second].sort((a, b) => a - b) },
      ]),
    );
  });

  it("answers someone else's draft as missing: another operator can neither edit nor submit it, nor learn it exists (common practice)", async () => {
    const [author, other] = await Promise.all([makeUser('operator'), makeUser('operator')]);
    const batchId = await makeBatch();
    const draft = await createDraft(author, draftInput([batchId]));
    const { id, version } = draft.record;
    await expect(updateDraft(other, { ...draftInput([batchId]), id, version, title: 'Rewritten by someone else' })).rejects.toThrow(
      NotFoundError,
    );
    await expect(submitDeviation(other, { id, version })).rejects.toThrow(NotFoundError);
    const row = await deviation(id);
    expect(row).toMatchObject({ status: 'draft', version, title: draftInput([]).title, number: null });
    expect(await batchStatus(batchId)).toBe('in_process');
  });

  it('refuses a draft that names a batch that does not exist, field by field', async () => {
    const operator = await makeUser('operator');
    const err = await createDraft(operator, draftInput([2_000_000_000])).catch((e) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.batchId).toBeDefined();
  });

  it('refuses a stale version with a conflict and overwrites nothing (common practice: optimistic locking)', async () => {
    const operator = await makeUser('operator');
    const batchId = await makeBatch();
    const draft = await createDraft(operator, draftInput([batchId]));
    const { id, version } = draft.record;
    await updateDraft(operator, { ...draftInput([batchId]), id, version, title: 'First edit wins here' });
    await expect(updateDraft(operator, { ...draftInput([batchId]), id, version, title: 'Second edit, stale' })).rejects.toThrow(
      ConflictError,
    );
    await expect(submitDeviation(operator, { id, version })).rejects.toThrow(ConflictError);
    expect(await deviation(id)).toMatchObject({ title: 'First edit wins here', status: 'draft' });
  });
});

describe('triage and investigation', () => {
  it('refuses an operator triage: classification is a quality unit decision (21 CFR 211.22(a))', async () => {
    const { operator, record } = await reportedDeviation();
    await expect(startTriage(operator, { id: record.id, version: record.version })).rejects.toThrow(ForbiddenError);
    const investigator = await makeUser('qa_investigator');
    const triage = (await startTriage(investigator, { id: record.id, version: record.version })).record;
    await expect(
      recordTriage(operator, { id: triage.id, version: triage.version, classification: 'minor', severity: 2, occurrence: 2, detection: 2 }),
    ).rejects.toThrow(ForbiddenError);
    expect((await deviation(record.id)).classification).toBeNull();
  });

  it('records the triage with its RPN, assigns the investigator and tells them by mail', async () => {
    const { record } = await reportedDeviation();
    const [triager, investigator] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_investigator')]);
    const t = (await startTriage(triager, { id: record.id, version: record.version })).record;
    const triaged = await recordTriage(triager, {
      id: t.id,
      version: t.version,
      classification: 'major',
      severity: 7,
      occurrence: 4,
      detection: 5,
      investigatorId: investigator.id,
    });
    // RPN = S × O × D (IEC 60812 FMEA).
    expect(triaged.record).toMatchObject({ status: 'triage', classification: 'major', rpn: 140, investigatorId: investigator.id });
    const audit = await auditOf('deviation', record.id);
    expect(audit.at(-1)!.action).toBe('record_triage');
    expect(JSON.parse(audit.at(-1)!.changes)).toEqual(expect.arrayContaining([{ field: 'rpn', from: null, to: 140 }]));

    const assigned = await assignInvestigation(triager, { id: t.id, version: triaged.record.version });
    expect(assigned.record.status).toBe('investigation');
    const mail = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'deviation'), eq(mailOutbox.recordId, record.id)));
    expect(mail.map((m) => m.toUserId)).toEqual([investigator.id]);
  });

  it('refuses triage of a deviation that is not in triage', async () => {
    const { record } = await reportedDeviation();
    const investigator = await makeUser('qa_investigator');
    await expect(
      recordTriage(investigator, { id: record.id, version: record.version, classification: 'minor', severity: 1, occurrence: 1, detection: 1 }),
    ).rejects.toThrow(InvalidTransitionError);
  });

  it('has the assigned investigator sign "investigation complete" (21 CFR 11.50) and asks independent approvers', async () => {
    const { investigator, approver, submitted, record } = await deviationInApproval();
    expect(record.status).toBe('approval');
    expect(submitted.signature).toMatchObject({ meaning: 'investigation_complete', printedName: investigator.name });
    const [stored] = await db
      .select()
      .from(signatures)
      .where(and(eq(signatures.recordType, 'deviation'), eq(signatures.recordId, record.id)));
    expect(stored).toMatchObject({ meaning: 'investigation_complete', userId: investigator.id });
    const asked = await db
      .select({ to: mailOutbox.toUserId })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordId, record.id), eq(mailOutbox.template, 'deviation_approval_requested')));
    expect(asked.map((m) => m.to)).toContain(approver.id);
    expect(asked.map((m) => m.to)).not.toContain(investigator.id);
  });
});

describe('approval and batch disposition', () => {
  it('refuses to approve while a held batch has no disposition (21 CFR 211.192), changing nothing', async () => {
    const { approver, batchId, record } = await deviationInApproval();
    const err = await approveDeviation(approver, { id: record.id, version: record.version, password: testPassword }).catch((e) => e);
    expect(err).toBeInstanceOf(InvalidTransitionError);
    expect((err as Error).message).toMatch(/Every held batch needs a disposition/);
    expect(await deviation(record.id)).toMatchObject({ status: 'approval', version: record.version });
    expect(await batchStatus(batchId)).toBe('on_hold');
  });

  it('refuses approval by the investigator (21 CFR 211.22(a); segregation of duties, common practice)', async () => {
    const { investigator, batchId, record } = await deviationInApproval();
    await db
      .update(deviationBatches)
      .set({ disposition: 'release' })
      .where(and(eq(deviationBatches.deviationId, record.id), eq(deviationBatches.batchId, batchId)));
    await expect(
      approveDeviation(investigator, { id: record.id, version: record.version, password: testPassword }),
    ).rejects.toThrow(ForbiddenError);
    expect((await deviation(record.id)).status).toBe('approval');
  });

  it('lets an independent QA approver approve with an "approved" signature: the batch is released and audited', async () => {
    const { approver, batchId, record } = await deviationInApproval();
    await db
      .update(deviationBatches)
      .set({ disposition: 'release' })
      .where(and(eq(deviationBatches.deviationId, record.id), eq(deviationBatches.batchId, batchId)));
    const out = await approveDeviation(approver, { id: record.id, version: record.version, password: testPassword });
    expect(out.record.status).toBe('closed');
    expect(out.record.closedAt).not.toBeNull();
    // 21 CFR 11.50: printed name and meaning of the signature.
    expect(out.signature).toMatchObject({ meaning: 'approved', printedName: approver.name });
    // 21 CFR 211.22(a): the quality unit's approval releases the batch; the change is audited (11.10(e)).
    expect(await batchStatus(batchId)).toBe('released');
    const batchAudit = await auditOf('batch', batchId);
    expect(batchAudit.map((a) => a.action)).toEqual(['hold', 'disposition']);
    expect(JSON.parse(batchAudit[1]!.changes)).toEqual([{ field: 'status', from: 'on_hold', to: 'released' }]);
    expect(batchAudit[1]!.userId).toBe(approver.id);
  });

  it('rejects a batch whose disposition is reject and keeps a rework batch on hold (common practice)', async () => {
    const operator = await makeUser('operator');
    const [rejected, reworked] = await Promise.all([makeBatch(), makeBatch()]);
    const draft = await createDraft(operator, draftInput([rejected, reworked]));
    const reported = (await submitDeviation(operator, { id: draft.record.id, version: draft.record.version })).record;
    const [triager, investigator, approver] = await Promise.all([
      makeUser('qa_investigator'),
      makeUser('qa_investigator'),
      makeUser('qa_approver'),
    ]);
    let r = (await startTriage(triager, { id: reported.id, version: reported.version })).record;
    r = (
      await recordTriage(triager, {
        id: r.id,
        version: r.version,
        classification: 'critical',
        severity: 9,
        occurrence: 3,
        detection: 4,
        investigatorId: investigator.id,
      })
    ).record;
    r = (await assignInvestigation(triager, { id: r.id, version: r.version })).record;
    r = await completeInvestigation(investigator, r);
    r = (await submitForApproval(investigator, { id: r.id, version: r.version, password: testPassword })).record;
    r = (await returnForRework(approver, { id: r.id, version: r.version, reason: 'Extend the check to the second lot.' })).record;
    expect(r.status).toBe('investigation');
    r = (await submitForApproval(investigator, { id: r.id, version: r.version, password: testPassword })).record;
    await db.update(deviationBatches).set({ disposition: 'reject' }).where(and(eq(deviationBatches.deviationId, r.id), eq(deviationBatches.batchId, rejected)));
    await db.update(deviationBatches).set({ disposition: 'rework' }).where(and(eq(deviationBatches.deviationId, r.id), eq(deviationBatches.batchId, reworked)));
    await approveDeviation(approver, { id: r.id, version: r.version, password: testPassword });
    expect(await batchStatus(rejected)).toBe('rejected');
    expect(await batchStatus(reworked)).toBe('on_hold');
  });

  it('cancels with a reason and a signature by independent QA, leaving the hold in place (common practice)', async () => {
    const { batchId, record } = await reportedDeviation();
    const approver = await makeUser('qa_approver');
    const noReason = await cancelDeviation(approver, { id: record.id, version: record.version, reason: '', password: testPassword }).catch((e) => e);
    expect(noReason).toBeInstanceOf(ValidationError);
    const out = await cancelDeviation(approver, {
      id: record.id,
      version: record.version,
      reason: 'Duplicate of an earlier report of the same stop',
      password: testPassword,
    });
    expect(out.record).toMatchObject({ status: 'cancelled', cancelReason: 'Duplicate of an earlier report of the same stop' });
    expect(out.signature?.meaning).toBe('approved');
    expect(await batchStatus(batchId)).toBe('on_hold');
  });

  it('closes a minor deviation at triage on an approver signature with a justification, once its batch is dispositioned (21 CFR 211.192, 11.50)', async () => {
    const { batchId, record } = await reportedDeviation();
    const [triager, approver] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_approver')]);
    let r = (await startTriage(triager, { id: record.id, version: record.version })).record;
    // The deviation names no defect, so the starting class is major (classificationWithoutDefect): minor needs a reason.
    r = (
      await recordTriage(triager, {
        id: r.id,
        version: r.version,
        classification: 'minor',
        severity: 2,
        occurrence: 2,
        detection: 3,
        classificationReason: 'Cosmetic mark only; no effect on fill or shell integrity.',
      })
    ).record;
    const input = { id: r.id, version: r.version, reason: 'Cosmetic mark only; AQL re-check passed.', password: testPassword };
    await expect(closeMinor(approver, input)).rejects.toThrow(/Every held batch needs a disposition/);
    await db.update(deviationBatches).set({ disposition: 'release' }).where(eq(deviationBatches.deviationId, r.id));
    const out = await closeMinor(approver, input);
    expect(out.record).toMatchObject({ status: 'closed', closureJustification: input.reason });
    expect(out.signature?.meaning).toBe('approved');
    expect(await batchStatus(batchId)).toBe('released');
  });
});
