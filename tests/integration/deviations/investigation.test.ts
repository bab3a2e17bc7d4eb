import { randomBytes } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, batches, capas, capsuleDefects, deviations, products, recordLinks, signatures, stateHistory } from '@/db/schema';
import { fishboneFor } from '@/lib/causes';
import {
  assignInvestigation,
  createDraft,
  recordTriage,
  startTriage,
  submitDeviation,
  submitForApproval,
} from '@/lib/deviations/commands';
import { getInvestigationView, investigationConflictMessage, saveInvestigation } from '@/lib/deviations/investigation';
import type { SaveInvestigationInput } from '@/lib/deviations/investigation-schema';
import { ConflictError, ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '@/lib/errors';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * The investigation section against the real database. Sources beside each check: 21 CFR 211.192
 * (a written record of the investigation with its conclusions and follow-up), 21 CFR 11.10(e)
 * (audit trail with old and new values; earlier versions stay readable), 11.50 (signature meaning),
 * ICH Q10 3.2.2 (CAPA follows from the investigation), the OWASP XSS Prevention Cheat Sheet, and
 * common practice where noted.
 */

afterAll(closeDb);

const defectCode = 'broken_body';

async function makeBatch(): Promise<number> {
  const [product] = await db.select({ id: products.id }).from(products).limit(1);
  const lotNumber = `IT-INV-${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
  const [row] = await db
    .insert(batches)
    .values({ lotNumber, productId: product!.id, sizeCapsules: 150_000, manufacturedOn: '2026-11-20' })
    .$returningId();
  return row!.id;
}

/** A deviation for broken bodies under investigation by a fresh investigator. */
async function underInvestigation() {
  const [operator, triager, investigator] = await Promise.all([
    makeUser('operator'),
    makeUser('qa_investigator'),
    makeUser('qa_investigator'),
  ]);
  const [defect] = await db.select({ id: capsuleDefects.id }).from(capsuleDefects).where(eq(capsuleDefects.code, defectCode));
  const batchId = await makeBatch();
  const draft = await createDraft(operator, {
    title: 'Broken capsule bodies at the outfeed of Filler 2',
    whatHappened: 'Split bodies found in the outfeed chute at the 14:00 check, about 1 in 200.',
    occurredAt: new Date(Date.now() - 7_200_000),
    defectId: defect!.id,
    batchId,
    heldBatchIds: [batchId],
  });
  let r = (await submitDeviation(operator, { id: draft.record.id, version: draft.record.version })).record;
  r = (await startTriage(triager, { id: r.id, version: r.version })).record;
  r = (
    await recordTriage(triager, {
      id: r.id,
      version: r.version,
      classification: 'major',
      severity: 7,
      occurrence: 4,
      detection: 4,
      investigatorId: investigator.id,
    })
  ).record;
  r = (await assignInvestigation(triager, { id: r.id, version: r.version })).record;
  return { operator, triager, investigator, record: r };
}

const vacuumCause = () => {
  const all = fishboneFor(defectCode).branches.flatMap((b) => b.causes);
  const first = all[0];
  if (!first) throw new Error(`the cause catalogue has no causes for ${defectCode}`);
  return first;
};

const completeInput = (id: number, version: number, extra: Partial<SaveInvestigationInput> = {}): SaveInvestigationInput => ({
  id,
  version,
  investigationReport: '<h2>Findings</h2><p>Vacuum read 14 inHg; set point drifted after the filter change.</p><ul><li><p>Ring inspected: no cracks</p></li></ul>',
  fiveWhys: [
    { why: 'Why did bodies break?', because: 'They were pulled into the ring too hard.' },
    { why: 'Why too hard?', because: 'Vacuum was above the range.' },
  ],
  causeAnalysis: {
    catalogue: [{ causeId: vacuumCause().id, state: 'root_cause', note: 'Gauge at 14 inHg.' }],
    own: [{ branch: 'method', cause: 'No vacuum check after filter change', state: 'contributing', note: '' }],
  },
  rootCauseCategory: 'machine',
  rootCause: 'Vacuum set point above range after the filter change.',
  productImpact: 'Broken bodies removed by inspection; remaining capsules meet the AQL.',
  capaRequired: false,
  ...extra,
});

const row = async (id: number) => (await db.select().from(deviations).where(eq(deviations.id, id)))[0]!;
const auditOf = (recordType: 'deviation' | 'capa', id: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, recordType), eq(auditEntries.recordId, id)))
    .orderBy(asc(auditEntries.id));

describe('saving the investigation', () => {
  it('lets the assigned investigator save a partial draft, then the whole section, each save audited old → new', async () => {
    const { investigator, record } = await underInvestigation();
    const draft = await saveInvestigation(investigator, {
      id: record.id,
      version: record.version,
      investigationReport: '<p>First notes: vacuum looked high.</p>',
      capaRequired: '',
    });
    // Common practice: a draft may be partial; completeness is checked at signing.
    expect(draft.record).toMatchObject({ version: record.version + 1, investigationReport: '<p>First notes: vacuum looked high.</p>', rootCause: null });

    const full = await saveInvestigation(investigator, completeInput(record.id, draft.record.version));
    const stored = await row(record.id);
    expect(JSON.parse(stored.fiveWhys!)).toHaveLength(2);
    expect(JSON.parse(stored.causeAnalysis!)).toMatchObject({ catalogue: [{ state: 'root_cause' }], own: [{ branch: 'method' }] });
    expect(full.record.rootCauseCategory).toBe('machine');

    // 21 CFR 11.10(e): each save is an audit entry holding the whole report before and after, so
    // every saved version of the report stays readable in the trail.
    const saves = (await auditOf('deviation', record.id)).filter((e) => e.action === 'save_investigation');
    expect(saves).toHaveLength(2);
    const first = JSON.parse(saves[0]!.changes) as { field: string; from: unknown; to: unknown }[];
    const second = JSON.parse(saves[1]!.changes) as { field: string; from: unknown; to: unknown }[];
    expect(first).toContainEqual({ field: 'investigationReport', from: null, to: '<p>First notes: vacuum looked high.</p>' });
    expect(second).toContainEqual({
      field: 'investigationReport',
      from: '<p>First notes: vacuum looked high.</p>',
      to: completeInput(0, 0).investigationReport,
    });
    expect(second.map((c) => c.field)).toEqual(
      expect.arrayContaining(['fiveWhys', 'causeAnalysis', 'rootCauseCategory', 'rootCause', 'productImpact', 'capaRequired']),
    );
    expect(saves[1]!.userId).toBe(investigator.id);
  });

  it('strips script from the report before saving (OWASP XSS Prevention Cheat Sheet, rule 6)', async () => {
    const { investigator, record } = await underInvestigation();
    const out = await saveInvestigation(investigator, {
      ...completeInput(record.id, record.version),
      investigationReport: '<p onclick="steal()">Vacuum high.</p><script>fetch("/api/x")</script><img src=x onerror=alert(1)><a href="javascript:alert(1)">link</a>',
    });
    expect(out.record.investigationReport).toBe('<p>Vacuum high.</p>link');
    expect((await row(record.id)).investigationReport).toBe('<p>Vacuum high.</p>link');
  });

  it('refuses a report longer than the limit with a message beside the field, and saves nothing (common practice)', async () => {
    const { investigator, record } = await underInvestigation();
    const err = await saveInvestigation(investigator, {
      ...completeInput(record.id, record.version),
      investigationReport: `<p>${'x'.repeat(200_001)}</p>`,
    }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.investigationReport?.[0]).toMatch(/too long/);
    expect((await row(record.id)).version).toBe(record.version);
  });

  it('refuses a root-cause category outside the list and more than five whys, field by field', async () => {
    const { investigator, record } = await underInvestigation();
    const err = await saveInvestigation(investigator, {
      ...completeInput(record.id, record.version),
      rootCauseCategory: 'bad luck',
      fiveWhys: Array.from({ length: 6 }, (_, i) => ({ why: `why ${i}`, because: `because ${i}` })),
    }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect(Object.keys((err as ValidationError).fieldErrors)).toEqual(expect.arrayContaining(['rootCauseCategory', 'fiveWhys']));
  });

  it("refuses another investigator, an operator and an approver (role and record; common practice), and changes nothing", async () => {
    const { operator, record } = await underInvestigation();
    const [otherInvestigator, approver] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_approver')]);
    const input = completeInput(record.id, record.version);
    await expect(saveInvestigation(otherInvestigator, input)).rejects.toThrow(ForbiddenError);
    await expect(saveInvestigation(otherInvestigator, input)).rejects.toThrow(/investigator assigned to this deviation/);
    await expect(saveInvestigation(operator, input)).rejects.toThrow(ForbiddenError);
    await expect(saveInvestigation(approver, input)).rejects.toThrow(ForbiddenError);
    const stored = await row(record.id);
    expect(stored).toMatchObject({ version: record.version, investigationReport: null, rootCause: null });
  });

  it('refuses a save once the investigation is signed off (wrong state), keeping the signed content as signed', async () => {
    const { investigator, record } = await underInvestigation();
    const saved = await saveInvestigation(investigator, completeInput(record.id, record.version));
    const signed = await submitForApproval(investigator, { id: record.id, version: saved.record.version, password: testPassword });
    expect(signed.record.status).toBe('approval');
    await expect(
      saveInvestigation(investigator, completeInput(record.id, signed.record.version, { rootCause: 'Changed after signing' })),
    ).rejects.toThrow(InvalidTransitionError);
    expect((await row(record.id)).rootCause).toBe(completeInput(0, 0).rootCause);
  });

  it('refuses a stale version with "changed by someone else" and overwrites nothing (common practice: optimistic locking)', async () => {
    const { investigator, record } = await underInvestigation();
    await saveInvestigation(investigator, completeInput(record.id, record.version, { rootCause: 'First save wins.' }));
    const err = await saveInvestigation(investigator, completeInput(record.id, record.version, { rootCause: 'Second save, stale.' })).catch(
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(ConflictError);
    expect((err as ConflictError).message).toBe(investigationConflictMessage);
    expect((err as ConflictError).message).toMatch(/changed by someone else/);
    const stored = await row(record.id);
    expect(stored).toMatchObject({ rootCause: 'First save wins.', version: record.version + 1 });
    expect((await auditOf('deviation', record.id)).filter((e) => e.action === 'save_investigation')).toHaveLength(1);
  });

  it('refuses a cause id that is not in the catalogue of this defect', async () => {
    const { investigator, record } = await underInvestigation();
    const err = await saveInvestigation(investigator, {
      ...completeInput(record.id, record.version),
      causeAnalysis: { catalogue: [{ causeId: 'made_up_cause', state: 'root_cause', note: '' }], own: [] },
    }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.causeAnalysis).toBeDefined();
  });
});

describe('CAPA needed', () => {
  it('opens one proposed CAPA with a link and an audit entry the first time, never a second, and keeps it when switched back to no', async () => {
    const { investigator, record } = await underInvestigation();
    const first = await saveInvestigation(investigator, completeInput(record.id, record.version, { capaRequired: 'yes' }));
    expect(first.capaCreated).toMatchObject({ status: 'proposed' });
    const capaId = first.capaCreated!.id;
    const [capa] = await db.select().from(capas).where(eq(capas.id, capaId));
    // ICH Q10 3.2.2: the CAPA follows from, and is traceable to, the investigation.
    expect(capa).toMatchObject({
      status: 'proposed',
      sourceType: 'deviation',
      sourceId: record.id,
      title: record.title,
      ownerId: investigator.id,
      createdBy: investigator.id,
      rootCause: completeInput(0, 0).rootCause,
    });
    expect(capa!.number).toMatch(/^CAPA-\d{4}-\d{4}$/);
    expect(capa!.problemStatement).toContain(record.number!);
    expect(capa!.problemStatement).toContain('Split bodies found');
    const links = await db
      .select()
      .from(recordLinks)
      .where(and(eq(recordLinks.fromType, 'deviation'), eq(recordLinks.fromId, record.id), eq(recordLinks.relation, 'raised_capa')));
    expect(links).toMatchObject([{ toType: 'capa', toId: capaId, createdBy: investigator.id }]);
    // 21 CFR 11.10(e): the CAPA's creation is audited on the CAPA, and named on the deviation's save.
    const capaAudit = await auditOf('capa', capaId);
    expect(capaAudit).toMatchObject([{ action: 'create', userId: investigator.id }]);
    expect(JSON.parse(capaAudit[0]!.changes)).toContainEqual({ field: 'status', from: null, to: 'proposed' });
    const [save] = (await auditOf('deviation', record.id)).filter((e) => e.action === 'save_investigation');
    expect(JSON.parse(save!.changes)).toContainEqual({ field: 'raisedCapa', from: null, to: capa!.number });
    const history = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'capa'), eq(stateHistory.recordId, capaId)));
    expect(history).toMatchObject([{ event: 'create', toState: 'proposed' }]);

    // Saying yes again opens no second CAPA; saying no deletes nothing (GMP records are never deleted).
    const again = await saveInvestigation(investigator, completeInput(record.id, first.record.version, { capaRequired: 'yes', rootCause: 'Edited.' }));
    expect(again.capaCreated).toBeNull();
    const no = await saveInvestigation(investigator, completeInput(record.id, again.record.version, { capaRequired: 'no' }));
    expect(no.record.capaRequired).toBe(false);
    expect(await db.select().from(capas).where(and(eq(capas.sourceType, 'deviation'), eq(capas.sourceId, record.id)))).toHaveLength(1);
    const view = await getInvestigationView(record.id, investigator);
    expect(view.capas).toEqual([{ id: capaId, number: capa!.number, status: 'proposed' }]);
  });

  it('rolls the CAPA back with the save when the save fails (one transaction)', async () => {
    const { investigator, record } = await underInvestigation();
    await saveInvestigation(investigator, completeInput(record.id, record.version));
    await expect(saveInvestigation(investigator, completeInput(record.id, record.version, { capaRequired: 'yes' }))).rejects.toThrow(
      ConflictError,
    );
    expect(await db.select().from(capas).where(and(eq(capas.sourceType, 'deviation'), eq(capas.sourceId, record.id)))).toHaveLength(0);
  });
});

describe('signing the investigation off', () => {
  it('refuses "investigation complete" while report, category, root cause, impact or the CAPA decision is missing, then signs', async () => {
    const { investigator, record } = await underInvestigation();
    const partial = await saveInvestigation(investigator, { id: record.id, version: record.version, investigationReport: '<p></p>', rootCause: 'Vacuum high.' });
    const err = await submitForApproval(investigator, { id: record.id, version: partial.record.version, password: testPassword }).catch(
      (e: unknown) => e,
    );
    // 21 CFR 211.192: the written record includes the conclusions and follow-up.
    expect(err).toBeInstanceOf(ValidationError);
    expect(Object.keys((err as ValidationError).fieldErrors).sort()).toEqual(
      ['capaRequired', 'investigationReport', 'productImpact', 'rootCauseCategory'].sort(),
    );
    expect(await row(record.id)).toMatchObject({ status: 'investigation', version: partial.record.version });
    expect(await db.select().from(signatures).where(and(eq(signatures.recordType, 'deviation'), eq(signatures.recordId, record.id)))).toHaveLength(0);

    const complete = await saveInvestigation(investigator, completeInput(record.id, partial.record.version));
    const signed = await submitForApproval(investigator, { id: record.id, version: complete.record.version, password: testPassword });
    // 21 CFR 11.50: the signature states its meaning.
    expect(signed.record.status).toBe('approval');
    expect(signed.signature).toMatchObject({ meaning: 'investigation_complete', printedName: investigator.name });
  });
});

describe('reading the investigation', () => {
  it('shows the catalogue of the defect on six branches with the marks merged in, and who may edit', async () => {
    const { investigator, operator, record } = await underInvestigation();
    await saveInvestigation(investigator, completeInput(record.id, record.version));
    const mine = await getInvestigationView(record.id, investigator);
    expect(mine.canEdit).toBe(true);
    expect(mine.branches.map((b) => b.branch)).toEqual(['method', 'machine', 'material', 'measurement', 'people', 'environment']);
    const marked = mine.branches.flatMap((b) => b.causes).find((c) => c.causeId === vacuumCause().id);
    expect(marked).toMatchObject({ state: 'root_cause', note: 'Gauge at 14 inHg.' });
    expect(mine.branches.find((b) => b.branch === 'method')!.causes).toContainEqual(
      expect.objectContaining({ causeId: null, cause: 'No vacuum check after filter change', state: 'contributing' }),
    );
    expect(mine.fiveWhys).toHaveLength(2);

    const theirs = await getInvestigationView(record.id, operator);
    expect(theirs.canEdit).toBe(false);
    const other = await makeUser('qa_investigator');
    expect(await getInvestigationView(record.id, other)).toMatchObject({ canEdit: false, editRefusal: expect.stringMatching(/investigator assigned to this deviation/) });
  });

  it("hides someone else's draft as not found (common practice)", async () => {
    const operator = await makeUser('operator');
    const draft = await createDraft(operator, {
      title: 'A draft nobody else sees',
      whatHappened: 'Still being written by the operator.',
      occurredAt: new Date(Date.now() - 60_000),
      heldBatchIds: [],
    });
    await expect(getInvestigationView(draft.record.id, await makeUser('qa_investigator'))).rejects.toThrow(NotFoundError);
  });
});
