import { and, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, stateHistory } from '@/db/schema';
import { registerRing } from '@/lib/equipment/commands';
import { ForbiddenError, ValidationError } from '@/lib/errors';
import { makeMachine, makeUser } from '../support/fixtures';

/*
 * Registering a ring is master data (Annex 11 §12.1: access limited to authorised people, here the
 * administrator). It goes through createRecord, so the ring starts its lifecycle with a history row
 * and a "create" audit entry (21 CFR 11.10(e)). A ring only fits a machine that has change parts for
 * its capsule size (common practice).
 */

afterAll(closeDb);

describe('registering a filling ring', () => {
  it('puts a new ring in service with its first history row and audit entry', async () => {
    const admin = await makeUser('admin');
    const machine = await makeMachine({ capsuleSizes: '0,1' });
    const serial = `IT-NEW-${Date.now()}`;
    const out = await registerRing(admin, { machineId: machine.id, serial, capsuleSize: '1', condition: 'good' });
    expect(out.record).toMatchObject({ serial, status: 'in_service', version: 1, machineId: machine.id });
    expect(out.allowedEvents).toEqual([]);
    const [h] = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'filling_ring'), eq(stateHistory.recordId, out.record.id)));
    expect(h).toMatchObject({ event: 'create', fromState: null, toState: 'in_service', userId: admin.id });
    const [entry] = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'filling_ring'), eq(auditEntries.recordId, out.record.id)));
    expect(entry).toMatchObject({ action: 'create', userId: admin.id });
    expect(JSON.parse(entry!.changes)).toEqual(expect.arrayContaining([{ field: 'condition', from: null, to: 'good' }]));
  });

  it('refuses a second ring with the same serial, on the serial field', async () => {
    const admin = await makeUser('admin');
    const machine = await makeMachine();
    const serial = `IT-DUP-${Date.now()}`;
    await registerRing(admin, { machineId: machine.id, serial, capsuleSize: '0', condition: 'good' });
    const err = await registerRing(admin, { machineId: machine.id, serial, capsuleSize: '0', condition: 'good' }).catch(
      (e) => e,
    );
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.serial?.[0]).toMatch(/already registered/);
  });

  it('refuses a size the machine has no change parts for', async () => {
    const admin = await makeUser('admin');
    const machine = await makeMachine({ capsuleSizes: '00,0' });
    const err = await registerRing(admin, {
      machineId: machine.id,
      serial: `IT-SIZE-${Date.now()}`,
      capsuleSize: '3',
      condition: 'good',
    }).catch((e) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.capsuleSize).toBeDefined();
  });

  it('refuses anyone but an administrator', async () => {
    const approver = await makeUser('qa_approver');
    const machine = await makeMachine();
    await expect(
      registerRing(approver, { machineId: machine.id, serial: `IT-ROLE-${Date.now()}`, capsuleSize: '0', condition: 'good' }),
    ).rejects.toThrow(ForbiddenError);
  });
});
