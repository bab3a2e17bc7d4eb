import { desc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, connect, db } from '@/db/client';
import { capaActions, deviationBatches } from '@/db/schema';
import { uploadAttachment } from '@/lib/attachments/commands';
import { addAction, approvePlan, recordNotEffective, updatePlan } from '@/lib/capa/commands';
import { getCapaDetail } from '@/lib/capa/detail';
import { reopenComplaint, saveInvestigation as saveComplaintInvestigation } from '@/lib/complaints/commands';
import { getComplaintDetail } from '@/lib/complaints/detail';
import { recordDisposition } from '@/lib/deviations/batches';
import { returnForRework, submitForApproval } from '@/lib/deviations/commands';
import { getDeviationDetail } from '@/lib/deviations/detail';
import type { SignatureDto } from '@/lib/signatures';
import { testPassword } from '../support/fixtures';
import { type Cast, capaIn, complaintIn, deviationIn, makeCast } from '../support/stories';

/*
 * A signature covers what its signer attests (21 CFR 11.70: signatures are linked to their records
 * so they cannot be excised, copied or transferred; 21 CFR 11.10(e) and EU GMP Annex 11 §9: changes
 * after signing are visible). Each record kind declares per meaning which parts a signature covers:
 * the child rows the signer looked at (actions, dispositions, the investigation, the letter) and the
 * SHA-256 of every file. Here each of those is changed after signing, through the product where the
 * product allows it and behind its back where it does not, and the signature must then read as no
 * longer matching and say what changed; a later signature of the same meaning takes over.
 */

afterAll(closeDb);

let cast: Cast;
let admin: Awaited<ReturnType<typeof connect>>;
beforeAll(async () => {
  cast = await makeCast();
  admin = await connect(process.env.DATABASE_ADMIN_URL!);
});
afterAll(async () => {
  await admin?.conn.end();
});

const png = Buffer.from(
  'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==',
  'base64',
);

const byMeaning = (signatures: SignatureDto[], meaning: string) => signatures.filter((s) => s.meaning === meaning);

describe('deviation signatures', () => {
  it('shows "investigation complete" as changed once QA adds a file in approval, naming the evidence', async () => {
    const d = await deviationIn(cast, 'approval');
    let [signed] = byMeaning((await getDeviationDetail(d.id, cast.approver)).signatures, 'investigation_complete');
    expect(signed).toMatchObject({ matches: true, changedParts: [] });

    await uploadAttachment(cast.approver, { recordType: 'deviation', recordId: d.id, file: { name: 'line photo.png', bytes: png } });
    const detail = await getDeviationDetail(d.id, cast.approver);
    // Adding evidence bumps the version, so a form opened before the file arrived is stale.
    expect(detail.deviation.version).toBe(d.version + 1);
    [signed] = byMeaning(detail.signatures, 'investigation_complete');
    expect(signed).toMatchObject({ matches: false, changedParts: ['the evidence files'], supersededBy: null });
  });

  it('shows it as changed when the investigator reworks the recommended disposition, until they sign again', async () => {
    const d = await deviationIn(cast, 'approval');
    let version = (await returnForRework(cast.approver, { id: d.id, version: d.version, reason: 'Re-inspect, do not release (test).' })).record.version;
    version = (await recordDisposition(cast.investigator, { id: d.id, version, batchId: d.batchId, disposition: 'reject', note: 'Split bodies throughout (test).' })).version;
    let signatures = (await getDeviationDetail(d.id, cast.approver)).signatures;
    expect(byMeaning(signatures, 'investigation_complete')[0]).toMatchObject({ matches: false, changedParts: ['the recommended dispositions'] });

    await submitForApproval(cast.investigator, { id: d.id, version, password: testPassword });
    signatures = (await getDeviationDetail(d.id, cast.approver)).signatures;
    const [first, second] = byMeaning(signatures, 'investigation_complete');
    expect(first).toMatchObject({ matches: false, supersededBy: second!.id });
    expect(second).toMatchObject({ matches: true, supersededBy: null });
  });

  it('shows the approval as changed when a disposition is altered behind the product’s back', async () => {
    const d = await deviationIn(cast, 'closed');
    expect(byMeaning((await getDeviationDetail(d.id, cast.approver)).signatures, 'approved')[0]).toMatchObject({ matches: true });
    await admin.db.update(deviationBatches).set({ disposition: 'rework' }).where(eq(deviationBatches.deviationId, d.id));
    const [approval] = byMeaning((await getDeviationDetail(d.id, cast.approver)).signatures, 'approved');
    expect(approval).toMatchObject({ matches: false, changedParts: ['the batch dispositions'] });
    expect(approval!.intact).toBe(true);
  });
});

describe('CAPA signatures', () => {
  it('covers each round’s planned actions: a new round leaves the first approval standing and is covered by its own', async () => {
    const c = await capaIn(cast, 'effectiveness_check');
    let r = (await recordNotEffective(cast.approver, { id: c.id, version: c.version, reason: 'Two more broken-body deviations (test).', password: testPassword })).record;
    r = (
      await addAction(cast.investigator, {
        id: r.id,
        version: r.version,
        kind: 'corrective',
        category: 'procedure',
        description: 'Add a bore check to the changeover sheet.',
        ownerId: cast.supervisor.id,
        dueAt: new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10),
      })
    ).record;
    let detail = await getCapaDetail(c.id, cast.approver);
    // The first approval and the "not effective" decision covered round 1, which is as it was.
    expect(byMeaning(detail.signatures, 'approved')[0]).toMatchObject({ matches: true });
    expect(byMeaning(detail.signatures, 'not_effective')[0]).toMatchObject({ matches: true });

    // Rewriting the plan's criteria for round 2 does change what the first approval covered.
    r = (
      await updatePlan(cast.investigator, {
        id: r.id,
        version: r.version,
        title: r.title,
        problemStatement: r.problemStatement,
        effectivenessCriteria: 'No broken-body deviations on the test filler over the next 40 batches.',
      })
    ).record;
    detail = await getCapaDetail(c.id, cast.approver);
    expect(byMeaning(detail.signatures, 'approved')[0]).toMatchObject({ matches: false, changedParts: ['the plan'] });

    await approvePlan(cast.approver2, { id: r.id, version: r.version, password: testPassword });
    detail = await getCapaDetail(c.id, cast.approver);
    const [first, second] = byMeaning(detail.signatures, 'approved');
    expect(first!.supersededBy).toBe(second!.id);
    expect(second).toMatchObject({ matches: true });

    // Behind the product's back, a round-2 action changes: the second approval says so, by round.
    const [latest] = await db.select().from(capaActions).where(eq(capaActions.capaId, c.id)).orderBy(desc(capaActions.id)).limit(1);
    await admin.db.update(capaActions).set({ description: 'Nothing at all.' }).where(eq(capaActions.id, latest!.id));
    detail = await getCapaDetail(c.id, cast.approver);
    expect(byMeaning(detail.signatures, 'approved')[1]).toMatchObject({ matches: false, changedParts: ['the planned actions (round 2)'] });
  });

  it('covers how each action was completed in the effectiveness decision', async () => {
    const c = await capaIn(cast, 'closed_effective');
    expect(byMeaning((await getCapaDetail(c.id, cast.approver)).signatures, 'effective')[0]).toMatchObject({ matches: true });
    await admin.db.update(capaActions).set({ evidence: '<p>Nothing was done.</p>' }).where(eq(capaActions.id, c.actionId!));
    const signatures = (await getCapaDetail(c.id, cast.approver)).signatures;
    expect(byMeaning(signatures, 'effective')[0]).toMatchObject({ matches: false, changedParts: ['how the actions were completed (round 1)'] });
    // The plan approval did not cover the completion, so it still stands.
    expect(byMeaning(signatures, 'approved')[0]).toMatchObject({ matches: true });
  });
});

describe('complaint signatures', () => {
  it('covers the answer in the closing approval and the investigation in "investigation complete": a reopen and an edit show both changed', async () => {
    const c = await complaintIn(cast, 'closed');
    let signatures = (await getComplaintDetail(c.id, cast.approver)).signatures;
    expect(signatures.map((s) => [s.meaning, s.matches])).toEqual([
      ['reportability_decided', true],
      ['investigation_complete', true],
      ['approved', true],
    ]);
    let r = (await reopenComplaint(cast.investigator, { id: c.id, version: c.version, to: 'investigation', reason: 'A second lot reported (test).' })).record;
    signatures = (await getComplaintDetail(c.id, cast.approver)).signatures;
    expect(byMeaning(signatures, 'approved')[0]).toMatchObject({ matches: false, changedParts: ['the answer as sent'] });
    expect(byMeaning(signatures, 'investigation_complete')[0]).toMatchObject({ matches: true });

    r = (
      await saveComplaintInvestigation(cast.investigator, {
        id: r.id,
        version: r.version,
        retainedSamplesChecked: 'yes',
        investigationSummary: 'Second lot also affected: the vacuum sensor drifted (test).',
      })
    ).record;
    signatures = (await getComplaintDetail(c.id, cast.approver)).signatures;
    expect(byMeaning(signatures, 'investigation_complete')[0]).toMatchObject({ matches: false, changedParts: ['the investigation'] });
    // The reportability decision covered intake and assessment only; neither changed.
    expect(byMeaning(signatures, 'reportability_decided')[0]).toMatchObject({ matches: true });
  });
});
