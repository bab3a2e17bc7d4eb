import { randomBytes } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, batches, capsuleDefects, deviationBatches, deviations, products, users, weightChecks } from '@/db/schema';
import { extendHolds, listHoldSuggestions, recordDisposition } from '@/lib/deviations/batches';
import {
  approveDeviation,
  assignInvestigation,
  closeMinor,
  createDraft,
  recordTriage,
  startTriage,
  submitDeviation,
  submitForApproval,
} from '@/lib/deviations/commands';
import { ConflictError, ForbiddenError, InvalidTransitionError, ValidationError } from '@/lib/errors';
import { makeMachine, makeUser, testPassword } from '../support/fixtures';

/*
 * Held batches on a deviation against the real database: dispositions recommended by the assigned
 * investigator and decided by an independent QA approver, holds extended at triage, and the triage
 * class checked on the server. Sources beside each check: 21 CFR 211.192 (the investigation extends
 * to other batches that may be affected; written record with conclusions), 211.22(a) (the quality
 * unit approves or rejects), 11.10(e) (audit trail), ISO 2859-1:1999 (sampling plans); common
 * practice where noted.
 */

afterAll(closeDb);

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();

let productId: Promise<number> | undefined;

async function makeBatch(values: Partial<typeof batches.$inferInsert> = {}): Promise<{ id: number; lot: string }> {
  productId ??= db
    .select({ id: products.id })
    .from(products)
    .limit(1)
    .then((r) => r[0]!.id);
  const lot = `IT-HB-${unique()}`;
  const [row] = await db
    .insert(batches)
    .values({ lotNumber: lot, productId: await productId, sizeCapsules: 5_000, manufacturedOn: '2026-11-20', ...values })
    .$returningId();
  return { id: row!.id, lot };
}

const batchStatus = async (id: number) => (await db.select().from(batches).where(eq(batches.id, id)))[0]!.status;
const versionOf = async (id: number) => (await db.select().from(deviations).where(eq(deviations.id, id)))[0]!.version;
const heldRow = async (deviationId: number, batchId: number) =>
  (
    await db
      .select()
      .from(deviationBatches)
      .where(and(eq(deviationBatches.deviationId, deviationId), eq(deviationBatches.batchId, batchId)))
  )[0];
const auditOf = (recordType: 'deviation' | 'batch', id: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.recordId, id)))
    .orderBy(asc(auditEntries.id));

async function reported(heldBatchIds: number[], extra: Record<string, unknown> = {}) {
  const operator = await makeUser('operator');
  const draft = await createDraft(operator, {
    title: 'Split bodies at the filler outfeed',
    whatHappened: 'Operator found split capsule bodies in the outfeed chute at the 10:00 check.',
    occurredAt: new Date(Date.now() - 3_600_000),
    batchId: heldBatchIds[0],
    heldBatchIds,
    ...extra,
  });
  const out = await submitDeviation(operator, { id: draft.record.id, version: draft.record.version });
  return { operator, record: out.record };
}

/** Raised by an operator, triaged by one investigator, assigned to another; in investigation. */
async function inInvestigation(batchCount = 1) {
  const held = await Promise.all(Array.from({ length: batchCount }, () => makeBatch()));
  const { operator, record } = await reported(held.map((b) => b.id));
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
      investigatorId: investigator.id,
    })
  ).record;
  r = (await assignInvestigation(triager, { id: r.id, version: r.version })).record;
  return { operator, triager, investigator, approver, held, id: r.id, version: r.version };
}

/** The investigation's own section is tested elsewhere; its conclusions are written straight in here. */
async function toApproval(d: Awaited<ReturnType<typeof inInvestigation>>) {
  await db
    .update(deviations)
    .set({
      investigationReport: '<p>Ring BWR-T dented at the segment seam; bodies split on closing.</p>',
      rootCauseCategory: 'machine',
      rootCause: 'Dented filling ring.',
      productImpact: 'Split bodies removed by sorting.',
      capaRequired: true,
    })
    .where(eq(deviations.id, d.id));
  const version = await versionOf(d.id);
  const out = await submitForApproval(d.investigator, { id: d.id, version, password: testPassword });
  return out.record.version;
}

describe('recording a held batch disposition', () => {
  it('lets the assigned investigator recommend one; it becomes the proposal, bumps the version and is audited by lot', async () => {
    const d = await inInvestigation();
    const batch = d.held[0]!;
    const out = await recordDisposition(d.investigator, {
      id: d.id,
      version: d.version,
      batchId: batch.id,
      disposition: 'release',
      note: 'Weight sort passed; uniformity of mass in limits.',
    });
    expect(out.version).toBe(d.version + 1);
    // 21 CFR 211.192: the recommendation is part of the written record the approver signs.
    expect(await heldRow(d.id, batch.id)).toMatchObject({ recommendedDisposition: 'release', disposition: 'release', samplingPlan: null });
    // 21 CFR 11.10(e): who, when, and each changed field, old → new, named by lot.
    const last = (await auditOf('deviation', d.id)).at(-1)!;
    expect(last).toMatchObject({ action: 'record_disposition', userId: d.investigator.id });
    expect(JSON.parse(last.changes)).toEqual(
      expect.arrayContaining([
        { field: `recommendedDisposition (${batch.lot})`, from: null, to: 'release' },
        { field: `disposition (${batch.lot})`, from: null, to: 'release' },
      ]),
    );
  });

  it('refuses an operator (21 CFR 211.22(a): dispositions are a quality unit decision)', async () => {
    const d = await inInvestigation();
    await expect(
      recordDisposition(d.operator, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release' }),
    ).rejects.toThrow(ForbiddenError);
    expect(await heldRow(d.id, d.held[0]!.id)).toMatchObject({ disposition: null });
  });

  it("refuses a QA investigator who is not assigned: user B cannot touch A's investigation (common practice)", async () => {
    const d = await inInvestigation();
    await expect(
      recordDisposition(d.triager, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release' }),
    ).rejects.toThrow(/Only the investigator assigned/);
    expect(await versionOf(d.id)).toBe(d.version);
  });

  it('refuses an approver during the investigation: the recommendation comes first', async () => {
    const d = await inInvestigation();
    await expect(
      recordDisposition(d.approver, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release' }),
    ).rejects.toThrow(ForbiddenError);
  });

  it('refuses a stale version with a conflict, changing nothing', async () => {
    const d = await inInvestigation();
    const input = { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release' as const };
    await recordDisposition(d.investigator, input);
    const err = await recordDisposition(d.investigator, { ...input, disposition: 're_inspect' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ConflictError);
    expect((err as Error).message).toMatch(/changed by someone else/);
    expect(await heldRow(d.id, d.held[0]!.id)).toMatchObject({ disposition: 'release' });
  });

  it('requires a note to reject or rework (21 CFR 211.192: conclusions are written down)', async () => {
    const d = await inInvestigation();
    for (const disposition of ['reject', 'rework'] as const) {
      const err = await recordDisposition(d.investigator, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition }).catch(
        (e: unknown) => e,
      );
      expect(err).toBeInstanceOf(ValidationError);
      expect((err as ValidationError).fieldErrors.note).toBeDefined();
    }
    expect(await versionOf(d.id)).toBe(d.version);
  });

  it('refuses a batch the deviation does not hold', async () => {
    const d = await inInvestigation();
    const other = await makeBatch();
    await expect(
      recordDisposition(d.investigator, { id: d.id, version: d.version, batchId: other.id, disposition: 'release' }),
    ).rejects.toThrow(/not held by this deviation/);
  });

  it('stores the ISO 2859-1 plan of a re-inspection from the batch size and the chosen level and AQL', async () => {
    const d = await inInvestigation();
    await recordDisposition(d.investigator, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 're_inspect' });
    // ISO 2859-1:1999 Table 1: 5,000 at general level II → L; Table 2-A: n 200, AQL 0.65 → Ac 3, Re 4.
    // Level II and normal inspection are the defaults (clauses 9.1, 10.1); AQL 0.65 common practice for major defects.
    expect((await heldRow(d.id, d.held[0]!.id))!.samplingPlan).toBe('ISO 2859-1 normal, level II, code letter L, n=200, AQL 0.65: Ac 3 Re 4');
    await recordDisposition(d.investigator, {
      id: d.id,
      version: d.version + 1,
      batchId: d.held[0]!.id,
      disposition: 're_inspect',
      inspectionLevel: 'III',
      aql: '1.0',
    });
    // ISO 2859-1:1999 Table 1: 5,000 at level III → M; Table 2-A: n 315, AQL 1.0 → Ac 7, Re 8.
    expect((await heldRow(d.id, d.held[0]!.id))!.samplingPlan).toBe('ISO 2859-1 normal, level III, code letter M, n=315, AQL 1.0: Ac 7 Re 8');
  });
});

describe('the final disposition at approval', () => {
  it('refuses the author and the investigator (21 CFR 211.22(a); segregation of duties, common practice)', async () => {
    const d = await inInvestigation();
    await recordDisposition(d.investigator, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release' });
    const version = await toApproval(d);
    for (const who of [d.investigator, d.operator]) {
      await expect(
        recordDisposition(who, { id: d.id, version, batchId: d.held[0]!.id, disposition: 'reject', note: 'Reject after all.' }),
      ).rejects.toThrow(ForbiddenError);
    }
    expect(await heldRow(d.id, d.held[0]!.id)).toMatchObject({ disposition: 'release' });
  });

  it('lets an independent approver change it with a note, keeping the recommendation beside it (common practice)', async () => {
    const d = await inInvestigation();
    await recordDisposition(d.investigator, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release', note: 'Sorted.' });
    const version = await toApproval(d);
    const noNote = await recordDisposition(d.approver, { id: d.id, version, batchId: d.held[0]!.id, disposition: 're_inspect' }).catch(
      (e: unknown) => e,
    );
    expect(noNote).toBeInstanceOf(ValidationError);
    expect((noNote as Error).message).toMatch(/differs from the recommended/);
    await recordDisposition(d.approver, {
      id: d.id,
      version,
      batchId: d.held[0]!.id,
      disposition: 're_inspect',
      note: 'Sort records incomplete: AQL re-inspection before release.',
    });
    expect(await heldRow(d.id, d.held[0]!.id)).toMatchObject({
      recommendedDisposition: 'release',
      disposition: 're_inspect',
      dispositionNote: 'Sort records incomplete: AQL re-inspection before release.',
    });
  });

  it('refuses approval until every held batch has one, then applies them: release, unless held elsewhere, and reject', async () => {
    const d = await inInvestigation(3);
    const [released, rejected, heldElsewhere] = d.held as [(typeof d.held)[0], (typeof d.held)[0], (typeof d.held)[0]];
    // Another open deviation also holds the third batch.
    await reported([heldElsewhere.id]);
    let version = d.version;
    version = (await recordDisposition(d.investigator, { id: d.id, version, batchId: released.id, disposition: 'release' })).version;
    version = (await recordDisposition(d.investigator, { id: d.id, version, batchId: rejected.id, disposition: 'reject', note: 'Split bodies throughout.' })).version;
    version = await toApproval(d);

    // 21 CFR 211.192: no closure while a held batch has no disposition; the refusal (409) names the lot and points at the form.
    const refused = await approveDeviation(d.approver, { id: d.id, version, password: testPassword }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(InvalidTransitionError);
    expect((refused as Error).message).toContain(heldElsewhere.lot);
    expect((refused as Error).message).toMatch(/Held batches/);

    version = (
      await recordDisposition(d.approver, { id: d.id, version, batchId: heldElsewhere.id, disposition: 'release', note: 'Not affected: made before the ring change.' })
    ).version;
    await approveDeviation(d.approver, { id: d.id, version, password: testPassword });
    // 21 CFR 211.22(a): the quality unit's approval releases and rejects; a batch another open deviation holds stays on hold.
    expect(await batchStatus(released.id)).toBe('released');
    expect(await batchStatus(rejected.id)).toBe('rejected');
    expect(await batchStatus(heldElsewhere.id)).toBe('on_hold');
  });

  it('refuses a recording after closure', async () => {
    const d = await inInvestigation();
    let version = (await recordDisposition(d.investigator, { id: d.id, version: d.version, batchId: d.held[0]!.id, disposition: 'release' })).version;
    version = await toApproval(d);
    version = (await approveDeviation(d.approver, { id: d.id, version, password: testPassword })).record.version;
    await expect(
      recordDisposition(d.approver, { id: d.id, version, batchId: d.held[0]!.id, disposition: 'reject', note: 'Too late.' }),
    ).rejects.toThrow(InvalidTransitionError);
  });
});

describe('dispositions at triage for a minor closure', () => {
  it('lets an independent approver set them on a minor deviation and close it; refuses on a major one', async () => {
    const batch = await makeBatch();
    const { record } = await reported([batch.id]);
    const [triager, approver] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_approver')]);
    let r = (await startTriage(triager, { id: record.id, version: record.version })).record;
    r = (
      await recordTriage(triager, {
        id: r.id,
        version: r.version,
        classification: 'minor',
        classificationReason: 'Cosmetic marks only; no effect on fill or closure.',
        severity: 2,
        occurrence: 2,
        detection: 3,
      })
    ).record;
    // Only the approver, not the triaging investigator, decides at triage (21 CFR 211.22(a)).
    await expect(recordDisposition(triager, { id: r.id, version: r.version, batchId: batch.id, disposition: 'release' })).rejects.toThrow(
      ForbiddenError,
    );
    const out = await recordDisposition(approver, { id: r.id, version: r.version, batchId: batch.id, disposition: 'release' });
    expect(await heldRow(r.id, batch.id)).toMatchObject({ recommendedDisposition: 'release', disposition: 'release' });
    await closeMinor(approver, { id: r.id, version: out.version, reason: 'Cosmetic only; AQL re-check passed.', password: testPassword });
    expect(await batchStatus(batch.id)).toBe('released');

    const d = await inInvestigation();
    const majorInTriage = await reported([d.held[0]!.id]);
    const t = (await startTriage(triager, { id: majorInTriage.record.id, version: majorInTriage.record.version })).record;
    const t2 = (await recordTriage(triager, { id: t.id, version: t.version, classification: 'major', severity: 7, occurrence: 4, detection: 5 })).record;
    await expect(recordDisposition(approver, { id: t2.id, version: t2.version, batchId: d.held[0]!.id, disposition: 'release' })).rejects.toThrow(
      InvalidTransitionError,
    );
  });
});

describe('extending holds at triage', () => {
  it('suggests batches on the same filler or ring since the last passing weight check, newest first (211.192; common practice)', async () => {
    const machine = await makeMachine();
    const [recorder] = await db.select({ id: users.id }).from(users).limit(1);
    const before = await makeBatch({ machineId: machine.id, manufacturedOn: '2026-11-01' });
    const after1 = await makeBatch({ machineId: machine.id, manufacturedOn: '2026-11-18' });
    const after2 = await makeBatch({ machineId: machine.id, manufacturedOn: '2026-11-25', status: 'released' });
    const rejected = await makeBatch({ machineId: machine.id, manufacturedOn: '2026-11-26', status: 'rejected' });
    const own = await makeBatch({ machineId: machine.id, manufacturedOn: '2026-11-27' });
    const elsewhere = await makeBatch({ manufacturedOn: '2026-11-27' });
    const { record } = await reported([own.id]);
    const qa = await makeUser('qa_investigator');

    // No passing check on record: the last 30 days before the occurrence (common practice).
    let found = await listHoldSuggestions(record.id, qa);
    expect(found.basis).toEqual({ kind: 'default_window', days: 30 });

    await db.insert(weightChecks).values({
      batchId: before.id,
      productId: (await productId)!,
      machineId: machine.id,
      method: 'ph_eur_2_9_5',
      massMode: 'net',
      massesMg: '[]',
      sampleSize: 20,
      meanMg: '300.000',
      sdMg: '3.000',
      minMg: '295.000',
      maxMg: '305.000',
      outOfLimitCount: 0,
      verdict: 'pass',
      evaluation: '{}',
      recordedBy: recorder!.id,
      checkedAt: new Date('2026-11-15T08:00:00Z'),
    });
    found = await listHoldSuggestions(record.id, qa);
    expect(found).toMatchObject({ since: '2026-11-15', basis: { kind: 'weight_check' } });
    expect(found.suggestions.map((s) => s.lotNumber)).toEqual([rejected.lot, after2.lot, after1.lot]);
    expect(found.suggestions.map((s) => s.canHold)).toEqual([false, true, true]);
    expect(found.suggestions.map((s) => s.lotNumber)).not.toContain(elsewhere.lot);

    const operator = await makeUser('operator');
    await expect(listHoldSuggestions(record.id, operator)).rejects.toThrow(ForbiddenError);
  });

  it('puts the chosen batches on hold, each audited on the batch, the list on the deviation (21 CFR 11.10(e))', async () => {
    const first = await makeBatch();
    const [b1, b2] = await Promise.all([makeBatch({ status: 'released' }), makeBatch()]);
    const { record } = await reported([first.id]);
    const qa = await makeUser('qa_investigator');
    const out = await extendHolds(qa, { id: record.id, version: record.version, batchIds: [b1.id, b2.id] });
    expect(out.version).toBe(record.version + 1);
    expect(await batchStatus(b1.id)).toBe('on_hold');
    expect(await batchStatus(b2.id)).toBe('on_hold');
    for (const b of [b1, b2]) {
      const trail = await auditOf('batch', b.id);
      expect(trail.at(-1)).toMatchObject({ action: 'hold', userId: qa.id });
      expect(trail.at(-1)!.reason).toContain(record.number!);
    }
    const last = (await auditOf('deviation', record.id)).at(-1)!;
    expect(last.action).toBe('extend_holds');
    expect(JSON.parse(last.changes)).toEqual([
      { field: 'heldBatchIds', from: [first.id], to: [first.id, b1.id, b2.id].sort((a, b) => a - b) },
    ]);
  });

  it('refuses an operator, an approver, a stale version, a batch held already and a rejected batch', async () => {
    const first = await makeBatch();
    const other = await makeBatch();
    const rejected = await makeBatch({ status: 'rejected' });
    const { operator, record } = await reported([first.id]);
    const [qa, approver] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_approver')]);
    const input = { id: record.id, version: record.version, batchIds: [other.id] };
    await expect(extendHolds(operator, input)).rejects.toThrow(ForbiddenError);
    await expect(extendHolds(approver, input)).rejects.toThrow(ForbiddenError);
    await expect(extendHolds(qa, { ...input, batchIds: [first.id] })).rejects.toThrow(/holds .* already/);
    await expect(extendHolds(qa, { ...input, batchIds: [rejected.id] })).rejects.toThrow(/rejected already/);
    await extendHolds(qa, input);
    await expect(extendHolds(qa, { ...input, batchIds: [rejected.id] })).rejects.toThrow(ConflictError);
    expect(await batchStatus(other.id)).toBe('on_hold');
  });
});

describe('the triage class is checked on the server', () => {
  async function critical() {
    const [defect] = await db
      .select({ id: capsuleDefects.id })
      .from(capsuleDefects)
      .where(eq(capsuleDefects.defaultClassification, 'critical'))
      .limit(1);
    const batch = await makeBatch();
    const { record } = await reported([batch.id], { defectId: defect!.id });
    const qa = await makeUser('qa_investigator');
    const t = (await startTriage(qa, { id: record.id, version: record.version })).record;
    return { qa, t };
  }

  it('refuses a class below the defect catalogue class without a justification (lib/risk/classify; common practice)', async () => {
    const { qa, t } = await critical();
    // A forged request: "minor" for a defect the catalogue classes critical, and no justification.
    const err = await recordTriage(qa, { id: t.id, version: t.version, classification: 'minor', severity: 3, occurrence: 2, detection: 2 }).catch(
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.classificationReason).toBeDefined();
    expect((await db.select().from(deviations).where(eq(deviations.id, t.id)))[0]).toMatchObject({ classification: null, version: t.version });
  });

  it('records the computed class when none is picked, and a lower one only with a justification', async () => {
    const { qa, t } = await critical();
    const computed = await recordTriage(qa, { id: t.id, version: t.version, severity: 3, occurrence: 2, detection: 2 });
    expect(computed.record.classification).toBe('critical');
    const lowered = await recordTriage(qa, {
      id: t.id,
      version: computed.record.version,
      classification: 'major',
      classificationReason: 'Foreign matter was a shell fragment, not metal; confirmed under the microscope.',
      severity: 3,
      occurrence: 2,
      detection: 2,
    });
    expect(lowered.record.classification).toBe('major');
  });
});
