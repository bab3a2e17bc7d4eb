import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { db } from '@/db/client';
import { batches, capaActions, products } from '@/db/schema';
import {
  addAction,
  approvePlan,
  cancelCapa,
  completeAction,
  createCapa,
  openEffectivenessCheck,
  recordEffective,
  startImplementation,
  updatePlan,
} from '@/lib/capa/commands';
import {
  closeComplaint,
  completeAssessment,
  completeInvestigation,
  createComplaint,
  saveAssessment,
  saveInvestigation as saveComplaintInvestigation,
  saveResponseDraft,
  sendResponse,
  startAssessment,
} from '@/lib/complaints/commands';
import { recordDisposition } from '@/lib/deviations/batches';
import {
  approveDeviation,
  assignInvestigation,
  cancelDeviation,
  createDraft,
  discardDraft,
  recordTriage,
  startTriage,
  submitDeviation,
  submitForApproval,
} from '@/lib/deviations/commands';
import { saveInvestigation } from '@/lib/deviations/investigation';
import { quarantineRing, retireRing } from '@/lib/equipment/commands';
import type { CapaState, ComplaintState, DeviationState, RingState } from '@/workflows/states';
import { type TestUser, makeRing, makeUser, testPassword } from './fixtures';

/*
 * Records in any state of their lifecycle, built through the same commands people use, with a cast
 * in which every step is taken by someone the rules allow (segregation of duties included). Each
 * record gets its own batch and product, so tests neither see each other's records nor depend on
 * their order.
 */

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();

export interface Cast {
  operator: TestUser;
  operator2: TestUser;
  supervisor: TestUser;
  /** Triages deviations and creates CAPAs. */
  triager: TestUser;
  /** Investigates deviations, owns CAPAs and complaints. */
  investigator: TestUser;
  /** Writes and sends complaint answers. */
  investigator2: TestUser;
  approver: TestUser;
  approver2: TestUser;
  admin: TestUser;
}

export async function makeCast(): Promise<Cast> {
  const [operator, operator2, supervisor, triager, investigator, investigator2, approver, approver2, admin] = await Promise.all([
    makeUser('operator'),
    makeUser('operator'),
    makeUser('supervisor'),
    makeUser('qa_investigator'),
    makeUser('qa_investigator'),
    makeUser('qa_investigator'),
    makeUser('qa_approver'),
    makeUser('qa_approver'),
    makeUser('admin'),
  ]);
  return { operator, operator2, supervisor, triager, investigator, investigator2, approver, approver2, admin };
}

let sharedProduct: Promise<number> | undefined;

/** A supplement product of the test run's own (so complaints about it are reportable only when serious). */
export function testProduct(): Promise<number> {
  sharedProduct ??= (async () => {
    const code = `IT-P-${unique()}`.slice(0, 32);
    const [row] = await db
      .insert(products)
      .values({
        code,
        name: `Test product ${code}`,
        strength: '500 mg',
        capsuleSize: '0',
        shellMaterial: 'gelatin',
        regulatoryClass: 'supplement',
        targetFillMg: '500.00',
        fillLowerMg: '475.00',
        fillUpperMg: '525.00',
      })
      .$returningId();
    return row!.id;
  })();
  return sharedProduct;
}

const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const dayMs = 86_400_000;

export async function makeTestBatch(): Promise<{ id: number; lot: string }> {
  const lot = `IT-L-${unique()}`.slice(0, 40);
  const [row] = await db
    .insert(batches)
    .values({ lotNumber: lot, productId: await testProduct(), sizeCapsules: 120_000, unitsShipped: 100_000, manufacturedOn: isoDay(Date.now() - 40 * dayMs) })
    .$returningId();
  return { id: row!.id, lot };
}

export interface Built {
  id: number;
  version: number;
}

// ── Deviations ──

const deviationOrder: DeviationState[] = ['draft', 'reported', 'triage', 'investigation', 'approval', 'closed'];

export async function deviationIn(cast: Cast, state: DeviationState, author: TestUser = cast.operator): Promise<Built & { batchId: number }> {
  const batch = await makeTestBatch();
  let r = (
    await createDraft(author, {
      title: 'Broken capsule bodies at the outfeed',
      whatHappened: 'Split bodies seen in the outfeed chute during the hourly check.',
      occurredAt: new Date(Date.now() - 3_600_000),
      batchId: batch.id,
      heldBatchIds: [batch.id],
      lineStopped: true,
    })
  ).record;
  const done = () => ({ id: r.id, version: r.version, batchId: batch.id });
  if (state === 'discarded') {
    r = (await discardDraft(author, { id: r.id, version: r.version })).record;
    return done();
  }
  if (state === 'draft') return done();
  r = (await submitDeviation(author, { id: r.id, version: r.version })).record;
  if (state === 'cancelled') {
    r = (await cancelDeviation(cast.approver, { id: r.id, version: r.version, reason: 'Raised twice by mistake (test).', password: testPassword })).record;
    return done();
  }
  const reach = (s: DeviationState) => deviationOrder.indexOf(state) >= deviationOrder.indexOf(s);
  if (!reach('triage')) return done();
  r = (await startTriage(cast.triager, { id: r.id, version: r.version })).record;
  if (!reach('investigation')) return done();
  r = (
    await recordTriage(cast.triager, {
      id: r.id,
      version: r.version,
      severity: 7,
      occurrence: 4,
      detection: 5,
      classification: 'major',
      investigatorId: cast.investigator.id,
    })
  ).record;
  r = (await assignInvestigation(cast.triager, { id: r.id, version: r.version })).record;
  // Under investigation with everything written, so the investigator could sign it now.
  r = (
    await saveInvestigation(cast.investigator, {
      id: r.id,
      version: r.version,
      investigationReport: '<p>Bodies broke at the pin plate; the bore on segment 3 was damaged.</p>',
      rootCauseCategory: 'machine',
      rootCause: 'Damaged body plate bore.',
      productImpact: 'Broken bodies removed by 100 % inspection; fill weights within limits.',
      capaRequired: false,
    })
  ).record;
  const recommended = await recordDisposition(cast.investigator, { id: r.id, version: r.version, batchId: batch.id, disposition: 'release' });
  r = { ...r, version: recommended.version };
  if (!reach('approval')) return done();
  r = (await submitForApproval(cast.investigator, { id: r.id, version: r.version, password: testPassword })).record;
  if (!reach('closed')) return done();
  r = (await approveDeviation(cast.approver, { id: r.id, version: r.version, password: testPassword })).record;
  return done();
}

// ── CAPA ──

const capaOrder: CapaState[] = ['proposed', 'plan_approved', 'implementation', 'effectiveness_check', 'closed_effective'];

/** Created by the triager, owned by the investigator, one action for the operator, approved by the approver. */
export async function capaIn(cast: Cast, state: CapaState): Promise<Built & { actionId: number | null }> {
  let r = (
    await createCapa(cast.triager, {
      title: 'Stop broken bodies on the test filler',
      sourceType: 'trend',
      problemStatement: 'Broken bodies recur on one ring segment of the test filler.',
      ownerId: cast.investigator.id,
    })
  ).record;
  let actionId: number | null = null;
  const done = () => ({ id: r.id, version: r.version, actionId });
  const reach = (s: CapaState) => capaOrder.indexOf(state) >= capaOrder.indexOf(s);
  r = (
    await addAction(cast.investigator, {
      id: r.id,
      version: r.version,
      kind: 'corrective',
      category: 'machine_setting',
      description: 'Re-set the vacuum on the separating station and log it.',
      ownerId: cast.operator.id,
      dueAt: isoDay(Date.now() + 14 * dayMs),
    })
  ).record;
  const [a] = await db.select().from(capaActions).where(eq(capaActions.capaId, r.id));
  actionId = a!.id;
  if (state === 'cancelled') {
    r = (await cancelCapa(cast.approver2, { id: r.id, version: r.version, reason: 'Raised twice (test).', password: testPassword })).record;
    return done();
  }
  r = (
    await updatePlan(cast.investigator, {
      id: r.id,
      version: r.version,
      title: r.title,
      problemStatement: r.problemStatement,
      effectivenessCriteria: 'No broken-body deviations on the test filler over the next 20 batches.',
    })
  ).record;
  if (!reach('plan_approved')) return done();
  r = (await approvePlan(cast.approver, { id: r.id, version: r.version, password: testPassword })).record;
  if (!reach('implementation')) return done();
  const started = await startImplementation(cast.investigator, { id: r.id, version: r.version });
  r = started.record;
  if (!reach('effectiveness_check')) return done();
  r = (await completeAction(cast.operator, { id: r.id, actionId: a!.id, actionVersion: a!.version, evidence: '<p>Vacuum re-set to 0.6 bar; log sheet 14 signed.</p>' })).record;
  r = (await openEffectivenessCheck(cast.investigator, { id: r.id, version: r.version })).record;
  if (!reach('closed_effective')) return done();
  r = (await recordEffective(cast.approver, { id: r.id, version: r.version, password: testPassword })).record;
  return done();
}

// ── Complaints ──

const complaintOrder: ComplaintState[] = ['received', 'assessment', 'investigation', 'response', 'closed'];

/** Taken down by the operator, owned and assessed by the investigator, answered by investigator2, closed by the approver. */
export async function complaintIn(cast: Cast, state: ComplaintState, takenBy: TestUser = cast.operator): Promise<Built> {
  const batch = await makeTestBatch();
  let r = (
    await createComplaint(takenBy, {
      complainantName: 'Wendeline Quarrystone',
      complainantContact: 'w.quarrystone@customers.example',
      complainantKind: 'consumer',
      channel: 'phone',
      receivedOn: isoDay(Date.now() - 5 * dayMs),
      lot: batch.lot,
      description: 'Several capsules in the bottle were empty: no powder inside at all.',
      personHarmed: 'false',
    })
  ).record;
  const done = () => ({ id: r.id, version: r.version });
  const reach = (s: ComplaintState) => complaintOrder.indexOf(state) >= complaintOrder.indexOf(s);
  if (!reach('assessment')) return done();
  r = (await startAssessment(cast.investigator, { id: r.id, version: r.version })).record;
  if (!reach('investigation')) return done();
  r = (
    await saveAssessment(cast.investigator, {
      id: r.id,
      version: r.version,
      category: 'empty_capsule',
      adverseEvent: 'no',
      reportable: 'no',
      assessmentRationale: 'Empty capsules are a quality defect; nobody was harmed, nothing to report.',
    })
  ).record;
  r = (await completeAssessment(cast.investigator, { id: r.id, version: r.version, password: testPassword })).record;
  if (!reach('response')) return done();
  r = (
    await saveComplaintInvestigation(cast.investigator, {
      id: r.id,
      version: r.version,
      retainedSamplesChecked: 'yes',
      investigationSummary: 'Retained samples full; the vacuum dropped for ten minutes on the filler.',
    })
  ).record;
  r = (await completeInvestigation(cast.investigator, { id: r.id, version: r.version, password: testPassword })).record;
  if (!reach('closed')) return done();
  r = (await saveResponseDraft(cast.investigator2, { id: r.id, version: r.version, letter: '<p>Thank you for telling us. We found the cause and fixed it.</p>' })).record;
  r = (await sendResponse(cast.investigator2, { id: r.id, version: r.version, channel: 'email' })).record;
  r = (await closeComplaint(cast.approver, { id: r.id, version: r.version, password: testPassword })).record;
  return done();
}

// ── Filling rings ──

export async function ringIn(cast: Cast, state: RingState): Promise<Built> {
  const ring = await makeRing();
  if (state === 'in_service') return { id: ring.id, version: ring.version };
  const q = (await quarantineRing(cast.operator, { id: ring.id, version: ring.version, reason: 'Dent on segment 2 (test).', condition: 'dented' })).record;
  if (state === 'quarantined') return { id: q.id, version: q.version };
  const r = (await retireRing(cast.approver, { id: q.id, version: q.version, reason: 'Beyond repair (test).', password: testPassword })).record;
  return { id: r.id, version: r.version };
}
