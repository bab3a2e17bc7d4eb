import { and, eq, sql } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, signatures, stateHistory } from '@/db/schema';
import { quarantineRing, retireRing } from '@/lib/equipment/commands';
import { makeRing, makeUser, mysqlErrno, testPassword } from '../support/fixtures';

/*
 * 21 CFR 11.10(e): audit trails must not obscure previously recorded information, and Annex 11 §9
 * asks that changes to GMP data be recorded. The application's own database account can add to
 * the audit trail, the signatures and the state history but cannot change or remove a row.
 * MariaDB answers a missing table privilege with error 1142 (ER_TABLEACCESS_DENIED_ERROR).
 */

afterAll(closeDb);

const tableAccessDenied = 1142;

async function expectDenied(statement: ReturnType<typeof sql>) {
  const err = await db.execute(statement).then(
    () => null,
    (e: unknown) => e,
  );
  expect(err, 'the statement should have been refused').not.toBeNull();
  expect(mysqlErrno(err)).toBe(tableAccessDenied);
}

describe('append-only records for the application user', () => {
  it('cannot UPDATE or DELETE audit entries, signatures or state history', async () => {
    const [operator, approver] = await Promise.all([makeUser('operator'), makeUser('qa_approver')]);
    const ring = await makeRing();
    await quarantineRing(operator, { id: ring.id, version: ring.version, reason: 'Dent found' });
    await retireRing(approver, { id: ring.id, version: ring.version + 1, reason: 'Beyond repair', password: testPassword });

    const [entry] = await db
      .select({ id: auditEntries.id, reason: auditEntries.reason })
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'filling_ring'), eq(auditEntries.recordId, ring.id)));
    const [signature] = await db.select().from(signatures).where(and(eq(signatures.recordType, 'filling_ring'), eq(signatures.recordId, ring.id)));
    const [history] = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'filling_ring'), eq(stateHistory.recordId, ring.id)));
    expect(entry && signature && history).toBeTruthy();

    await expectDenied(sql`UPDATE audit_entries SET reason = 'edited afterwards' WHERE id = ${entry!.id}`);
    await expectDenied(sql`DELETE FROM audit_entries WHERE id = ${entry!.id}`);
    await expectDenied(sql`UPDATE signatures SET meaning = 'reviewed' WHERE id = ${signature!.id}`);
    await expectDenied(sql`DELETE FROM signatures WHERE id = ${signature!.id}`);
    await expectDenied(sql`UPDATE state_history SET to_state = 'in_service' WHERE id = ${history!.id}`);
    await expectDenied(sql`DELETE FROM state_history WHERE id = ${history!.id}`);

    const [still] = await db.select().from(auditEntries).where(eq(auditEntries.id, entry!.id));
    expect(still!.reason).toBe(entry!.reason);
  });
});
