import { randomBytes } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { batches, products } from '@/db/schema';
import { createDraft, recordTriage, startTriage, submitDeviation } from '@/lib/deviations/commands';
import { getDeviationDetail, sendDeviationEvent } from '@/lib/deviations/detail';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '@/lib/errors';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * The deviation page's read and the event mapping behind POST /api/deviations/[id], against the real
 * database. Sources: 21 CFR 11.10(d) (access limited to authorised individuals), 11.10(e) (audit
 * trail available for review), 11.50 (signature manifestation), 211.192 (the batches a deviation
 * holds are part of its record); common practice where noted.
 */

afterAll(closeDb);

// The route answers these errors through `respond`, whose describeError maps ForbiddenError → 403,
// ConflictError → 409 and ValidationError → 422; the route itself needs a session, so the mapping
// function it calls is tested here.

async function makeBatch(): Promise<{ id: number; lotNumber: string }> {
  const [product] = await db.select({ id: products.id }).from(products).limit(1);
  const lotNumber = `IT-DET-${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
  const [row] = await db
    .insert(batches)
    .values({ lotNumber, productId: product!.id, sizeCapsules: 150_000, manufacturedOn: '2026-11-21' })
    .$returningId();
  return { id: row!.id, lotNumber };
}

async function draftBy(role: 'operator' | 'supervisor' = 'operator') {
  const author = await makeUser(role);
  const batch = await makeBatch();
  const draft = await createDraft(author, {
    title: 'Dented caps after the ring change',
    whatHappened: 'Dented caps found in the reject bin after the 14:00 ring change.',
    occurredAt: new Date(Date.now() - 7_200_000),
    batchId: batch.id,
    lineStopped: true,
    affectedCount: 55,
    heldBatchIds: [batch.id],
  });
  return { author, batch, draft: draft.record };
}

async function reported() {
  const d = await draftBy();
  const out = await submitDeviation(d.author, { id: d.draft.id, version: d.draft.version });
  return { ...d, record: out.record };
}

describe('getDeviationDetail', () => {
  it('shows the author their draft with the submit event, and hides it from everyone else as missing', async () => {
    const { author, draft } = await draftBy();
    const mine = await getDeviationDetail(draft.id, author);
    expect(mine.deviation).toMatchObject({ id: draft.id, status: 'draft', number: null });
    expect(mine.allowedEvents.map((e) => e.type)).toEqual(['submit', 'discard']);
    // Common practice: a draft is its author's until submitted; another person cannot tell it exists.
    for (const role of ['operator', 'qa_investigator', 'qa_approver', 'admin'] as const) {
      const other = await makeUser(role);
      await expect(getDeviationDetail(draft.id, other)).rejects.toBeInstanceOf(NotFoundError);
    }
  });

  it('gives a reported deviation to other readers with its held batches, history and next events by role', async () => {
    const { author, batch, record } = await reported();
    const investigator = await makeUser('qa_investigator');
    const operator = await makeUser('operator');

    const forQa = await getDeviationDetail(record.id, investigator);
    expect(forQa.deviation.number).toBe(record.number);
    expect(forQa.raisedByName).toBe(author.name);
    expect(forQa.lotNumber).toBe(batch.lotNumber);
    // 21 CFR 211.192: the batches the deviation holds are shown with their status and disposition.
    expect(forQa.heldBatches).toEqual([
      expect.objectContaining({ batchId: batch.id, lotNumber: batch.lotNumber, batchStatus: 'on_hold', onHold: true, disposition: null }),
    ]);
    expect(forQa.history.map((h) => h.event)).toEqual(['submit', 'create']);
    expect(forQa.allowedEvents.map((e) => e.type)).toEqual(expect.arrayContaining(['start_triage', 'cancel']));
    // An operator who did not raise it reads it but has nothing to do on it (common practice).
    expect((await getDeviationDetail(record.id, operator)).allowedEvents).toEqual([]);
  });

  it('includes the audit trail only for roles allowed to read it', async () => {
    const { record } = await reported();
    const operator = await makeUser('operator');
    const approver = await makeUser('qa_approver');
    // 21 CFR 11.10(e): the audit trail is available for review by the quality unit...
    const forQa = await getDeviationDetail(record.id, approver);
    expect(forQa.audit?.map((a) => a.action)).toEqual(['submit', 'create']);
    // ...and 11.10(d): access to it is limited to those authorised.
    expect((await getDeviationDetail(record.id, operator)).audit).toBeNull();
  });

  it('reports a record that does not exist as not found', async () => {
    const viewer = await makeUser('qa_investigator');
    await expect(getDeviationDetail(2_000_000_000, viewer)).rejects.toBeInstanceOf(NotFoundError);
  });
});

describe('sendDeviationEvent (POST /api/deviations/[id])', () => {
  it('refuses a role without the permission with 403 and changes nothing', async () => {
    const { record } = await reported();
    const operator = await makeUser('operator');
    // 21 CFR 11.10(g): authority checks; an operator cannot triage (issue spec).
    const err = await sendDeviationEvent(operator, record.id, { event: 'start_triage', version: record.version }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ForbiddenError);
    const viewer = await makeUser('qa_investigator');
    expect((await getDeviationDetail(record.id, viewer)).deviation).toMatchObject({ status: 'reported', version: record.version });
  });

  it('refuses a stale version with 409 (common practice: optimistic locking)', async () => {
    const { record } = await reported();
    const qa = await makeUser('qa_investigator');
    const err = await sendDeviationEvent(qa, record.id, { event: 'start_triage', version: record.version - 1 }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ConflictError);
  });

  it('maps each event to its command: start_triage moves the record, a signed event needs its password', async () => {
    const { record } = await reported();
    const qa = await makeUser('qa_investigator');
    const started = await sendDeviationEvent(qa, record.id, { event: 'start_triage', version: record.version });
    expect(started.record.status).toBe('triage');

    // 21 CFR 11.200(a): a cancellation is signed; without the password nothing happens (422).
    const unsigned = await sendDeviationEvent(qa, record.id, { event: 'cancel', version: started.record.version, reason: 'Duplicate of another report' }).catch(
      (e: unknown) => e,
    );
    expect(unsigned).toBeInstanceOf(ValidationError);
    expect((unsigned as ValidationError).fieldErrors.password).toBeDefined();

    const cancelled = await sendDeviationEvent(qa, record.id, {
      event: 'cancel',
      version: started.record.version,
      reason: 'Duplicate of another report',
      password: testPassword,
    });
    expect(cancelled.record).toMatchObject({ status: 'cancelled', cancelReason: 'Duplicate of another report' });
    const detail = await getDeviationDetail(record.id, qa);
    // 21 CFR 11.50(a): the signature shows the printed name and meaning, and matches the record (11.70).
    expect(detail.signatures).toEqual([expect.objectContaining({ printedName: qa.name, matches: true })]);
  });

  it('refuses an unknown event with 422', async () => {
    const { record } = await reported();
    const qa = await makeUser('qa_investigator');
    const err = await sendDeviationEvent(qa, record.id, { event: 'release', version: record.version }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.event).toBeDefined();
  });

  it('shows the triage and investigator once recorded (common practice)', async () => {
    const { record } = await reported();
    const qa = await makeUser('qa_investigator');
    const investigator = await makeUser('qa_investigator');
    const started = (await startTriage(qa, { id: record.id, version: record.version })).record;
    await recordTriage(qa, {
      id: record.id,
      version: started.version,
      classification: 'major',
      severity: 6,
      occurrence: 3,
      detection: 4,
      investigatorId: investigator.id,
      dueAt: new Date('2026-12-31T00:00:00Z'),
    });
    const detail = await getDeviationDetail(record.id, qa);
    expect(detail.deviation).toMatchObject({ classification: 'major', rpn: 72, investigatorId: investigator.id });
    expect(detail.investigatorName).toBe(investigator.name);
    expect(detail.ownerName).toBe(investigator.name);
    expect(detail.allowedEvents.map((e) => e.type)).toContain('assign_investigation');
  });
});
