import { randomBytes } from 'node:crypto';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, batches, capaActions, capas, capsuleDefects, deviations, mailOutbox, products, recordLinks, signatures } from '@/db/schema';
import {
  addAction,
  approvePlan,
  cancelCapa,
  completeAction,
  createCapa,
  openEffectivenessCheck,
  recordEffective,
  recordNotEffective,
  requestPlanApproval,
  startImplementation,
  updateAction,
  updatePlan,
} from '@/lib/capa/commands';
import { getCapaDetail, sendCapaEvent } from '@/lib/capa/detail';
import { computeRecurrence } from '@/lib/capa/recurrence';
import { ConflictError, ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '@/lib/errors';
import { makeMachine, makeUser, testPassword } from '../support/fixtures';

/*
 * CAPA commands against the real database. Sources beside each check: 21 CFR 820.100(a) (CAPA:
 * investigate, identify actions, verify effectiveness, implement, record), ICH Q10 §3.2.2 (CAPA
 * effectiveness evaluated), EU GMP Part I 1.4(xiv), 21 CFR 11.10(e) (audit trail of every change),
 * 11.50 (signature: name, date and time, meaning), and common practice where noted.
 */

afterAll(closeDb);

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
const dayMs = 86_400_000;
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

const capaRow = async (id: number) => (await db.select().from(capas).where(eq(capas.id, id)))[0]!;
const auditOf = (id: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'capa'), eq(auditEntries.recordId, id)))
    .orderBy(asc(auditEntries.id));

/** A reported deviation to raise the CAPA from (its id only matters, and its root cause). */
async function makeDeviation(raisedBy: number): Promise<number> {
  const [row] = await db
    .insert(deviations)
    .values({
      number: `DEV-IT-${unique()}`.slice(0, 20),
      status: 'closed',
      title: 'Broken bodies on a test ring',
      whatHappened: 'Broken bodies from one ring segment during the test run.',
      raisedBy,
      occurredAt: new Date(Date.now() - 30 * dayMs),
      rootCause: 'Dented ring segment catches bodies.',
      capaRequired: true,
    })
    .$returningId();
  return row!.id;
}

async function team() {
  const [owner, owner2, approver, approver2, operator, supervisor] = await Promise.all([
    makeUser('qa_investigator'),
    makeUser('qa_investigator'),
    makeUser('qa_approver'),
    makeUser('qa_approver'),
    makeUser('operator'),
    makeUser('supervisor'),
  ]);
  return { owner, owner2, approver, approver2, operator, supervisor };
}

const actionInput = (ownerId: number, extra: Record<string, unknown> = {}) => ({
  kind: 'corrective' as const,
  category: 'ring_retirement' as const,
  description: 'Retire the dented ring and fit a new one.',
  ownerId,
  dueAt: isoDay(Date.now() + 14 * dayMs),
  ...extra,
});

/** A CAPA with a complete plan: one action for the operator, criteria written. */
async function plannedCapa() {
  const t = await team();
  const deviationId = await makeDeviation(t.operator.id);
  const created = await createCapa(t.owner, {
    title: 'Stop broken bodies on the test ring',
    sourceType: 'deviation',
    sourceId: deviationId,
    problemStatement: 'Broken bodies recur on one ring segment.',
    ownerId: t.owner.id,
  });
  let r = created.record;
  r = (await addAction(t.owner, { id: r.id, version: r.version, ...actionInput(t.operator.id) })).record;
  r = (
    await updatePlan(t.owner, {
      id: r.id,
      version: r.version,
      title: r.title,
      problemStatement: r.problemStatement,
      rootCause: r.rootCause ?? undefined,
      effectivenessCriteria: 'No broken-body deviations on the test filler over the next 20 batches.',
      ownerId: t.owner.id,
    })
  ).record;
  return { ...t, deviationId, record: r };
}

async function inImplementation() {
  const p = await plannedCapa();
  let r = (await approvePlan(p.approver, { id: p.record.id, version: p.record.version, password: testPassword })).record;
  r = (await startImplementation(p.owner, { id: r.id, version: r.version })).record;
  const [action] = await db.select().from(capaActions).where(eq(capaActions.capaId, r.id));
  return { ...p, record: r, action: action! };
}

describe('raising a CAPA', () => {
  it('numbers it, carries the root cause over from the deviation, links it back and tells the owner (ICH Q10 §3.2.2)', async () => {
    const t = await team();
    const deviationId = await makeDeviation(t.operator.id);
    const out = await createCapa(t.approver, {
      title: 'Stop broken bodies on the test ring',
      sourceType: 'deviation',
      sourceId: deviationId,
      problemStatement: 'Broken bodies recur on one ring segment.',
      ownerId: t.owner.id,
    });
    expect(out.record.number).toMatch(new RegExp(`^CAPA-${new Date().getUTCFullYear()}-\\d{4}$`));
    expect(out.record).toMatchObject({ status: 'proposed', rootCause: 'Dented ring segment catches bodies.', ownerId: t.owner.id, planRound: 1 });
    const links = await db.select().from(recordLinks).where(and(eq(recordLinks.toType, 'capa'), eq(recordLinks.toId, out.record.id)));
    expect(links).toMatchObject([{ fromType: 'deviation', fromId: deviationId, relation: 'raised_capa' }]);
    const mail = await db.select().from(mailOutbox).where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, out.record.id)));
    expect(mail.map((m) => [m.template, m.toUserId])).toEqual([['capa_owner_assigned', t.owner.id]]);
    // 21 CFR 11.10(e): the creation is in the audit trail with the number.
    const audit = await auditOf(out.record.id);
    expect(audit[0]!.action).toBe('create');
  });

  it('refuses an operator (21 CFR 820.100(a): the CAPA procedure is QA\'s) and an owner who is not a QA investigator', async () => {
    const t = await team();
    const base = { title: 'A trend of light fills', sourceType: 'trend' as const, problemStatement: 'Light fills trend upward this quarter.' };
    await expect(createCapa(t.operator, { ...base, ownerId: t.owner.id })).rejects.toBeInstanceOf(ForbiddenError);
    await expect(createCapa(t.owner, { ...base, ownerId: t.operator.id })).rejects.toMatchObject({ fieldErrors: { ownerId: [expect.any(String)] } });
    await expect(createCapa(t.owner, { ...base, sourceType: 'deviation', ownerId: t.owner.id })).rejects.toMatchObject({
      fieldErrors: { sourceId: [expect.any(String)] },
    });
  });
});

describe('planning', () => {
  it('keeps an operator from planning (capa.plan is QA\'s; common practice)', async () => {
    const p = await plannedCapa();
    await expect(
      addAction(p.operator, { id: p.record.id, version: p.record.version, ...actionInput(p.operator.id) }),
    ).rejects.toBeInstanceOf(ForbiddenError);
  });

  it('refuses a stale version and changes nothing (common practice: optimistic locking)', async () => {
    const p = await plannedCapa();
    await expect(
      addAction(p.owner, { id: p.record.id, version: p.record.version - 1, ...actionInput(p.operator.id) }),
    ).rejects.toBeInstanceOf(ConflictError);
    expect((await capaRow(p.record.id)).actionsPlanned).toBe(1);
  });

  it('audits every plan and action change old → new, mails the action owner (21 CFR 11.10(e))', async () => {
    const p = await plannedCapa();
    const audit = await auditOf(p.record.id);
    const added = audit.find((a) => a.action === 'add_action')!;
    const changes = JSON.parse(added.changes) as { field: string; from: unknown; to: unknown }[];
    expect(changes.some((c) => /^action \d+ · description$/.test(c.field) && c.from === null)).toBe(true);
    const plan = audit.find((a) => a.action === 'update_plan')!;
    expect(JSON.parse(plan.changes)).toContainEqual({
      field: 'effectivenessCriteria',
      from: null,
      to: 'No broken-body deviations on the test filler over the next 20 batches.',
    });
    const mail = await db.select().from(mailOutbox).where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, p.record.id)));
    expect(mail.filter((m) => m.template === 'capa_action_assigned').map((m) => m.toUserId)).toEqual([p.operator.id]);
  });

  it('checks the recurrence criterion is complete, beside its fields', async () => {
    const p = await plannedCapa();
    await expect(
      updatePlan(p.owner, {
        id: p.record.id,
        version: p.record.version,
        title: p.record.title,
        problemStatement: p.record.problemStatement,
        ownerId: p.owner.id,
        criterionBatches: '20',
      }),
    ).rejects.toMatchObject({ fieldErrors: { criterionDefectId: [expect.any(String)], criterionMachineId: [expect.any(String)] } });
  });

  it('asks the approvers who may sign for plan approval, never the owner', async () => {
    const p = await plannedCapa();
    await requestPlanApproval(p.owner, { id: p.record.id, version: p.record.version });
    const mail = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, p.record.id), eq(mailOutbox.template, 'capa_plan_approval_requested')));
    expect(mail.map((m) => m.toUserId)).toEqual(expect.arrayContaining([p.approver.id, p.approver2.id]));
    expect(mail.map((m) => m.toUserId)).not.toContain(p.owner.id);
  });
});

describe('plan approval', () => {
  it('keeps the owner from approving their own plan, and an approver from being made owner (segregation of duties, common practice)', async () => {
    const p = await plannedCapa();
    await expect(approvePlan(p.owner, { id: p.record.id, version: p.record.version, password: testPassword })).rejects.toBeInstanceOf(
      ForbiddenError,
    );
    await expect(
      updatePlan(p.owner, {
        id: p.record.id,
        version: p.record.version,
        title: p.record.title,
        problemStatement: p.record.problemStatement,
        ownerId: p.approver.id,
      }),
    ).rejects.toMatchObject({ fieldErrors: { ownerId: [expect.any(String)] } });
    expect((await capaRow(p.record.id)).status).toBe('proposed');
  });

  it('refuses a plan without actions or criteria (21 CFR 820.100(a)(3)-(4))', async () => {
    const t = await team();
    const created = await createCapa(t.owner, { title: 'Empty plan', sourceType: 'trend', problemStatement: 'Nothing planned yet.', ownerId: t.owner.id });
    await expect(
      approvePlan(t.approver, { id: created.record.id, version: created.record.version, password: testPassword }),
    ).rejects.toBeInstanceOf(InvalidTransitionError);
  });

  it('is signed "approved" by the independent approver and lists what comes next (21 CFR 11.50)', async () => {
    const p = await plannedCapa();
    const out = await approvePlan(p.approver, { id: p.record.id, version: p.record.version, password: testPassword });
    expect(out.record.status).toBe('plan_approved');
    expect(out.signature).toMatchObject({ meaning: 'approved', printedName: p.approver.name });
    expect(out.record.planApprovedAt).not.toBeNull();
    // The owner is the one to start; the approver has nothing more to do here but cancel.
    expect(out.allowedEvents.map((e) => e.type)).toEqual(['cancel']);
  });

  it('refuses a wrong password and saves nothing (21 CFR 11.200(a))', async () => {
    const p = await plannedCapa();
    await expect(approvePlan(p.approver, { id: p.record.id, version: p.record.version, password: 'wrong' })).rejects.toThrow();
    expect((await capaRow(p.record.id)).status).toBe('proposed');
  });
});

describe('implementation and completing actions', () => {
  it('lets only the action owner complete their action, with evidence (21 CFR 820.100(a)(7))', async () => {
    const c = await inImplementation();
    const input = { id: c.record.id, actionId: c.action.id, actionVersion: c.action.version, evidence: 'Ring retired; new ring fitted and checked.' };
    // "user B cannot touch user A's record": another operator, and the CAPA owner, may not complete it.
    const otherOperator = await makeUser('operator');
    await expect(completeAction(otherOperator, input)).rejects.toBeInstanceOf(ForbiddenError);
    await expect(completeAction(c.owner, input)).rejects.toBeInstanceOf(ForbiddenError);
    await expect(completeAction(c.operator, { ...input, actionVersion: input.actionVersion + 1 })).rejects.toBeInstanceOf(ConflictError);

    const out = await completeAction(c.operator, input);
    expect(out.record).toMatchObject({ actionsOpen: 0, actionsPlanned: 1 });
    expect(out.record.actionsCompletedAt).not.toBeNull();
    const [done] = await db.select().from(capaActions).where(eq(capaActions.id, c.action.id));
    expect(done).toMatchObject({ completedBy: c.operator.id, evidence: input.evidence });
    await expect(completeAction(c.operator, { ...input, actionVersion: done!.version })).rejects.toBeInstanceOf(InvalidTransitionError);
  });

  it('refuses completing before the implementation starts', async () => {
    const p = await plannedCapa();
    const [action] = await db.select().from(capaActions).where(eq(capaActions.capaId, p.record.id));
    await expect(
      completeAction(p.operator, { id: p.record.id, actionId: action!.id, actionVersion: action!.version, evidence: 'Done early, before approval.' }),
    ).rejects.toBeInstanceOf(InvalidTransitionError);
  });

  it('opens the effectiveness check only once every action is completed, and asks the approvers (ICH Q10 §3.2.2)', async () => {
    const c = await inImplementation();
    await expect(openEffectivenessCheck(c.owner, { id: c.record.id, version: c.record.version })).rejects.toBeInstanceOf(InvalidTransitionError);
    const done = await completeAction(c.operator, { id: c.record.id, actionId: c.action.id, actionVersion: c.action.version, evidence: 'Ring retired and replaced.' });
    // An operator who does not own the CAPA cannot open it (capa.plan).
    await expect(openEffectivenessCheck(c.operator, { id: c.record.id, version: done.record.version })).rejects.toBeInstanceOf(ForbiddenError);
    const out = await openEffectivenessCheck(c.owner, { id: c.record.id, version: done.record.version });
    expect(out.record.status).toBe('effectiveness_check');
    const mail = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, c.record.id), eq(mailOutbox.template, 'capa_effectiveness_review')));
    expect(mail.map((m) => m.toUserId)).toContain(c.approver.id);
  });
});

describe('the effectiveness decision', () => {
  async function inCheck() {
    const c = await inImplementation();
    const done = await completeAction(c.operator, { id: c.record.id, actionId: c.action.id, actionVersion: c.action.version, evidence: 'Ring retired and replaced.' });
    const out = await openEffectivenessCheck(c.owner, { id: c.record.id, version: done.record.version });
    return { ...c, record: out.record };
  }

  it('closes on an "effective" signature by an approver who is not the owner (EU GMP 1.4(xiv), 21 CFR 11.50)', async () => {
    const c = await inCheck();
    const out = await recordEffective(c.approver2, { id: c.record.id, version: c.record.version, password: testPassword });
    expect(out.record).toMatchObject({ status: 'closed_effective', effectivenessResult: 'effective' });
    expect(out.signature).toMatchObject({ meaning: 'effective' });
    // The plan approval still matches what was signed: completing actions did not change the plan (21 CFR 11.70).
    const detail = await getCapaDetail(c.record.id, c.approver);
    expect(detail.signatures.every((s) => s.matches)).toBe(true);
  });

  it('sends it back to planning on "not effective", keeping the earlier actions on record', async () => {
    const c = await inCheck();
    await expect(
      recordNotEffective(c.approver, { id: c.record.id, version: c.record.version, reason: '', password: testPassword }),
    ).rejects.toBeInstanceOf(ValidationError);
    const out = await recordNotEffective(c.approver, {
      id: c.record.id,
      version: c.record.version,
      reason: 'Two broken-body deviations on the new ring within ten batches.',
      password: testPassword,
    });
    expect(out.record).toMatchObject({ status: 'proposed', planRound: 2, actionsPlanned: 0, actionsOpen: 0, effectivenessResult: 'not_effective' });
    const detail = await getCapaDetail(c.record.id, c.owner);
    expect(detail.actions).toHaveLength(1);
    expect(detail.actions[0]).toMatchObject({ round: 1, canEdit: false });
    // An earlier round's action cannot be changed.
    await expect(
      updateAction(c.owner, { id: c.record.id, version: out.record.version, actionId: c.action.id, ...actionInput(c.operator.id) }),
    ).rejects.toBeInstanceOf(InvalidTransitionError);
    // The next round needs its own actions before it can be approved again.
    await expect(approvePlan(c.approver, { id: c.record.id, version: out.record.version, password: testPassword })).rejects.toBeInstanceOf(
      InvalidTransitionError,
    );
  });

  it('cancels with a reason and a QA signature through the event route, not by a supervisor, and not by its owner', async () => {
    const p = await plannedCapa();
    await expect(
      sendCapaEvent(p.supervisor, p.record.id, { event: 'cancel', version: p.record.version, reason: 'Raised twice.', password: testPassword }),
    ).rejects.toBeInstanceOf(ForbiddenError);
    // Segregation of duties: the owner does not cancel their own CAPA (it could hide an ineffective one).
    const own = await sendCapaEvent(p.owner, p.record.id, { event: 'cancel', version: p.record.version, reason: 'Raised twice.', password: testPassword }).catch(
      (e: unknown) => e,
    );
    expect(own).toBeInstanceOf(ForbiddenError);
    expect((own as Error).message).toBe('“Cancel the CAPA” is for another person: you own this CAPA (segregation of duties).');
    const out = await sendCapaEvent(p.owner2, p.record.id, { event: 'cancel', version: p.record.version, reason: 'Raised twice.', password: testPassword });
    expect(out.record).toMatchObject({ status: 'cancelled', cancelReason: 'Raised twice.' });
    const sigs = await db.select().from(signatures).where(and(eq(signatures.recordType, 'capa'), eq(signatures.recordId, p.record.id)));
    expect(sigs.map((s) => s.meaning)).toEqual(['approved']);
  });

  it('reports a CAPA that does not exist as missing', async () => {
    const t = await team();
    await expect(getCapaDetail(2_000_000_000, t.owner)).rejects.toBeInstanceOf(NotFoundError);
    await expect(cancelCapa(t.owner, { id: 2_000_000_000, version: 1, reason: 'No such CAPA.', password: testPassword })).rejects.toBeInstanceOf(
      NotFoundError,
    );
  });
});

describe('recurrence evidence', () => {
  it('counts deviations with the same defect on the machine since the actions were completed, and batches made there (ICH Q10 §3.2.2)', async () => {
    const machine = await makeMachine();
    const other = await makeMachine();
    const [defect] = await db.select({ id: capsuleDefects.id }).from(capsuleDefects).limit(2);
    const [productRow] = await db.select({ id: products.id }).from(products).limit(1);
    const raiser = await makeUser('operator');
    const since = new Date(Date.now() - 10 * dayMs);
    const batch = (machineId: number, daysAgo: number) =>
      db.insert(batches).values({
        lotNumber: `IT-REC-${unique()}`,
        productId: productRow!.id,
        machineId,
        sizeCapsules: 100_000,
        manufacturedOn: isoDay(Date.now() - daysAgo * dayMs),
      });
    // Before the completion day, on it (may have run before), after it, and on another machine.
    await batch(machine.id, 12);
    await batch(machine.id, 10);
    await batch(machine.id, 5);
    await batch(machine.id, 2);
    await batch(other.id, 3);
    const deviation = (machineId: number, defectId: number, daysAgo: number, status: 'reported' | 'cancelled' | 'draft' = 'reported') =>
      db.insert(deviations).values({
        status,
        title: 'Recurrence test deviation',
        whatHappened: 'Counted or not by the recurrence test.',
        raisedBy: raiser.id,
        machineId,
        defectId,
        occurredAt: new Date(Date.now() - daysAgo * dayMs),
        createdAt: new Date(Date.now() - daysAgo * dayMs + 3_600_000),
      });
    await deviation(machine.id, defect!.id, 12); // before the actions: not counted
    await deviation(machine.id, defect!.id, 4); // counted
    await deviation(machine.id, defect!.id, 3, 'cancelled'); // raised in error: not counted
    await deviation(machine.id, defect!.id, 3, 'draft'); // not reported: not counted
    await deviation(other.id, defect!.id, 3); // another machine: not counted

    const evidence = await computeRecurrence(db, { defectId: defect!.id, machineId: machine.id, batches: 20 }, since);
    expect(evidence).toMatchObject({ recurrences: 1, batchesSince: 2, daysSince: 10, met: false, target: { batches: 20, days: null } });
    expect(evidence.summary).toMatch(/^1 .* deviation on .* over 2 of 20 batches since /);

    const none = await computeRecurrence(db, { defectId: defect!.id, machineId: other.id, batches: 1 }, new Date(Date.now() - 2.5 * dayMs));
    expect(none).toMatchObject({ recurrences: 0, met: 'pending' });
    const pending = await computeRecurrence(db, { defectId: defect!.id, machineId: machine.id, batches: 20 }, null);
    expect(pending).toMatchObject({ since: null, met: 'pending', recurrences: 0 });
  });
});
