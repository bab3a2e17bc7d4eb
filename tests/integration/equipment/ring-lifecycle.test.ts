import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, mailOutbox, signatures, stateHistory } from '@/db/schema';
import { quarantineRing, retireRing, returnRingToService } from '@/lib/equipment/commands';
import { getRingDetail } from '@/lib/equipment/queries';
import { ForbiddenError, InvalidTransitionError, NotFoundError, ValidationError } from '@/lib/errors';
import { getRing, makeRing, makeUser, testPassword } from '../support/fixtures';

/*
 * The filling ring lifecycle through the write path, against the real database. Role limits follow
 * the permission table (segregation of duties, 21 CFR 211.22 / EU GMP Part I 2.1: QA decides on
 * fitness for use); signatures on return and retirement follow 21 CFR 11.50 and 11.200(a); every
 * change leaves history and an audit entry (21 CFR 11.10(e)).
 */

afterAll(closeDb);

const history = (ringId: number) =>
  db
    .select()
    .from(stateHistory)
    .where(and(eq(stateHistory.recordType, 'filling_ring'), eq(stateHistory.recordId, ringId)))
    .orderBy(asc(stateHistory.id));

const audit = (ringId: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'filling_ring'), eq(auditEntries.recordId, ringId)))
    .orderBy(asc(auditEntries.id));

const ringSignatures = (ringId: number) =>
  db
    .select()
    .from(signatures)
    .where(and(eq(signatures.recordType, 'filling_ring'), eq(signatures.recordId, ringId)));

describe('filling ring lifecycle', () => {
  it('lets an operator quarantine a ring, recording reason, condition, history and audit entry', async () => {
    const operator = await makeUser('operator');
    const ring = await makeRing();
    const out = await quarantineRing(operator, {
      id: ring.id,
      version: ring.version,
      reason: 'Dent on segment 3 found at changeover',
      condition: 'dented',
    });
    expect(out.record).toMatchObject({ status: 'quarantined', condition: 'dented', version: ring.version + 1 });
    expect(out.record.statusReason).toBe('Dent on segment 3 found at changeover');
    expect(out.allowedEvents).toEqual([]);
    expect(out.signature).toBeNull();

    const [h] = await history(ring.id);
    expect(h).toMatchObject({ event: 'quarantine', fromState: 'in_service', toState: 'quarantined', userId: operator.id });
    const [entry] = await audit(ring.id);
    expect(entry).toMatchObject({ action: 'quarantine', userId: operator.id, userName: operator.name });
    expect(entry!.reason).toBe('Dent on segment 3 found at changeover');
    expect(JSON.parse(entry!.changes)).toEqual(
      expect.arrayContaining([
        { field: 'status', from: 'in_service', to: 'quarantined' },
        { field: 'condition', from: 'good', to: 'dented' },
      ]),
    );
  });

  it('queues a message to every other active QA reader when a ring is quarantined, in the same transaction', async () => {
    const [investigator, approver, supervisor] = await Promise.all([
      makeUser('qa_investigator'),
      makeUser('qa_approver'),
      makeUser('supervisor'),
    ]);
    const ring = await makeRing();
    await quarantineRing(supervisor, { id: ring.id, version: ring.version, reason: 'Burr on a bore' });
    const mail = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'filling_ring'), eq(mailOutbox.recordId, ring.id)));
    expect(mail.map((m) => m.toUserId)).toEqual(expect.arrayContaining([investigator.id, approver.id]));
    expect(mail.map((m) => m.toUserId)).not.toContain(supervisor.id);

    const other = await makeRing();
    await quarantineRing(investigator, { id: other.id, version: other.version, reason: 'Dent' });
    const second = await db
      .select({ to: mailOutbox.toUserId })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'filling_ring'), eq(mailOutbox.recordId, other.id)));
    expect(second.map((m) => m.to)).toContain(approver.id);
    expect(second.map((m) => m.to)).not.toContain(investigator.id);
    expect(mail[0]!.subject).toContain(ring.serial);
    expect(mail[0]!.textBody).toContain('Burr on a bore');
  });

  it('requires a reason to quarantine', async () => {
    const operator = await makeUser('operator');
    const ring = await makeRing();
    const err = await quarantineRing(operator, { id: ring.id, version: ring.version, reason: '   ' }).catch((e) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.reason).toBeDefined();
    expect((await getRing(ring.id)).status).toBe('in_service');
  });

  it('refuses an administrator: master data is not a GMP decision', async () => {
    const admin = await makeUser('admin');
    const ring = await makeRing();
    await expect(quarantineRing(admin, { id: ring.id, version: ring.version, reason: 'Looks dented' })).rejects.toThrow(
      ForbiddenError,
    );
  });

  it('refuses retirement by an operator, with the reason', async () => {
    const operator = await makeUser('operator');
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Cracked segment' });
    const err = await retireRing(operator, {
      id: ring.id,
      version: ring.version,
      reason: 'Scrap it',
      password: testPassword,
    }).catch((e) => e);
    expect(err).toBeInstanceOf(ForbiddenError);
    expect((err as Error).message).toMatch(/role does not allow.*ring: retire/i);
    expect((await getRing(ring.id)).status).toBe('quarantined');
  });

  it('refuses retirement by a QA investigator', async () => {
    const investigator = await makeUser('qa_investigator');
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Cracked segment' });
    await expect(
      retireRing(investigator, { id: ring.id, version: ring.version, reason: 'Scrap it', password: testPassword }),
    ).rejects.toThrow(ForbiddenError);
    expect(await ringSignatures(ring.id)).toHaveLength(0);
  });

  it('lets a QA approver retire a quarantined ring with an "approved" signature, and never return it', async () => {
    const approver = await makeUser('qa_approver', { title: 'Head of Quality' });
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Cracked segment', condition: 'damaged' });
    const before = Date.now();
    const out = await retireRing(approver, {
      id: ring.id,
      version: ring.version,
      reason: 'Crack runs through the bore; not repairable',
      password: testPassword,
    });
    expect(out.record.status).toBe('retired');
    expect(Date.parse(out.record.retiredAt!)).toBeGreaterThanOrEqual(before - 1000);
    expect(out.signature).toMatchObject({
      meaning: 'approved',
      printedName: approver.name,
      printedTitle: 'Head of Quality',
      recordVersion: ring.version + 1,
      matches: true,
      intact: true,
    });
    expect(out.allowedEvents).toEqual([]);

    const retired = await getRing(ring.id);
    const err = await returnRingToService(approver, {
      id: ring.id,
      version: retired.version,
      reason: 'Try again',
      condition: 'good',
      password: testPassword,
    }).catch((e) => e);
    expect(err).toBeInstanceOf(InvalidTransitionError);
    expect((err as Error).message).toMatch(/not possible while this filling ring is retired/);
    expect((await getRing(ring.id)).status).toBe('retired');
    expect(await ringSignatures(ring.id)).toHaveLength(1);
  });

  it('returns a quarantined ring to service on a QA investigator\'s "verified" signature', async () => {
    const investigator = await makeUser('qa_investigator');
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Suspected dent', condition: 'dented' });
    const out = await returnRingToService(investigator, {
      id: ring.id,
      version: ring.version,
      reason: 'Measured with gauge: within tolerance, mark was residue',
      condition: 'good',
      password: testPassword,
    });
    expect(out.record).toMatchObject({ status: 'in_service', condition: 'good', statusReason: null });
    expect(out.signature?.meaning).toBe('verified');
    expect(out.allowedEvents.map((e) => e.type)).toEqual(['quarantine']);
    const actions = (await audit(ring.id)).map((a) => a.action);
    expect(actions).toEqual(['return_to_service', 'signed']);
  });

  it('asks for the password before signing and changes nothing without it', async () => {
    const approver = await makeUser('qa_approver');
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Cracked' });
    const err = await retireRing(approver, { id: ring.id, version: ring.version, reason: 'Cracked', password: '' }).catch(
      (e) => e,
    );
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.password).toBeDefined();
    expect((await getRing(ring.id)).version).toBe(ring.version);
  });

  it('reports a ring that does not exist as not found', async () => {
    const operator = await makeUser('operator');
    await expect(quarantineRing(operator, { id: 2_000_000_000, version: 1, reason: 'Dent' })).rejects.toThrow(
      NotFoundError,
    );
  });

  it('offers each role only the events it may send now, with the signature each needs', async () => {
    const [operator, investigator, approver] = await Promise.all([
      makeUser('operator'),
      makeUser('qa_investigator'),
      makeUser('qa_approver'),
    ]);
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Dent' });
    const forOperator = await getRingDetail(operator, ring.id);
    expect(forOperator.allowedEvents).toEqual([]);
    expect(forOperator.audit).toBeNull();
    const forInvestigator = await getRingDetail(investigator, ring.id);
    expect(forInvestigator.allowedEvents).toEqual([
      { type: 'return_to_service', reasonRequired: true, signature: 'verified' },
    ]);
    const forApprover = await getRingDetail(approver, ring.id);
    expect(forApprover.allowedEvents).toEqual([
      { type: 'return_to_service', reasonRequired: true, signature: 'verified' },
      { type: 'retire', reasonRequired: true, signature: 'approved' },
    ]);
    expect(forApprover.audit).toEqual([]);
  });
});
