import { and, desc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, mailOutbox, users } from '@/db/schema';
import { verifyCredentials, verifySignaturePassword } from '@/lib/auth/credentials';
import { hashPassword } from '@/lib/auth/passwords';
import { ValidationError } from '@/lib/errors';

/*
 * Sign-in against the real database. 21 CFR 11.300(d) asks for safeguards against attempted
 * unauthorised use and for reporting such attempts; 11.10(e) asks that they leave an audit trail.
 * Five tries and fifteen minutes are common practice.
 */

const password = 'correct horse battery 42';
let seq = 0;

async function makeUser(): Promise<{ id: number; email: string }> {
  const email = `signin-${process.pid}-${Date.now()}-${seq++}@brackwater.example`;
  const [row] = await db
    .insert(users)
    .values({ email, name: 'Test Signer', role: 'operator', passwordHash: await hashPassword(password) })
    .$returningId();
  return { id: row!.id, email };
}

const auditActions = async (userId: number) =>
  (
    await db
      .select({ action: auditEntries.action, reason: auditEntries.reason })
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, userId)))
      .orderBy(desc(auditEntries.id))
  ).map((r) => r.action);

describe('sign-in and lock-out', () => {
  beforeAll(async () => {
    await db.select().from(users).limit(1);
  });
  afterAll(closeDb);

  it('accepts the right password and records the sign-in', async () => {
    const u = await makeUser();
    const result = await verifyCredentials(u.email.toUpperCase(), password);
    expect(result).toMatchObject({ id: u.id, email: u.email, role: 'operator' });
    expect(await auditActions(u.id)).toContain('signed_in');
  });

  it('gives the same answer for an unknown account as for a wrong password', async () => {
    const u = await makeUser();
    expect(await verifyCredentials('nobody-here@brackwater.example', password)).toBeNull();
    expect(await verifyCredentials(u.email, 'wrong password')).toBeNull();
  });

  it('locks the account after 5 consecutive failures, audits the lock, and refuses the right password while locked', async () => {
    const u = await makeUser();
    for (let i = 0; i < 4; i++) expect(await verifyCredentials(u.email, `wrong-${i}`)).toBeNull();
    let [row] = await db.select().from(users).where(eq(users.id, u.id));
    expect(row!.failedSignins).toBe(4);
    expect(row!.lockedUntil).toBeNull();

    expect(await verifyCredentials(u.email, 'wrong-5')).toBeNull();
    [row] = await db.select().from(users).where(eq(users.id, u.id));
    const minutes = (row!.lockedUntil!.getTime() - Date.now()) / 60_000;
    expect(minutes).toBeGreaterThan(14.9);
    expect(minutes).toBeLessThanOrEqual(15);

    expect(await verifyCredentials(u.email, password)).toBeNull();
    const actions = await auditActions(u.id);
    expect(actions.filter((a) => a === 'sign_in_failed')).toHaveLength(5);
    expect(actions).toContain('account_locked');
    expect(actions[0]).toBe('sign_in_refused_locked');

    // 11.300(d): attempts are reported "in an immediate and urgent manner" — every active
    // administrator gets a notice queued with the lock.
    const notices = await db
      .select({ to: mailOutbox.toAddress, template: mailOutbox.template })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'user'), eq(mailOutbox.recordId, u.id)));
    const admins = await db
      .select({ email: users.email })
      .from(users)
      .where(and(eq(users.role, 'admin'), eq(users.active, true)));
    expect(admins.length).toBeGreaterThan(0);
    expect(notices.map((n) => n.to).sort()).toEqual(admins.map((a) => a.email).sort());
    expect(notices.every((n) => n.template === 'account_locked')).toBe(true);
  });

  it('lets the user back in once the lock has expired, and a success resets the count', async () => {
    const u = await makeUser();
    await db.update(users).set({ failedSignins: 3, lockedUntil: new Date(Date.now() - 1000) }).where(eq(users.id, u.id));
    expect(await verifyCredentials(u.email, password)).not.toBeNull();
    const [row] = await db.select().from(users).where(eq(users.id, u.id));
    expect(row!.failedSignins).toBe(0);
  });

  it('refuses a deactivated account even with the right password', async () => {
    const u = await makeUser();
    await db.update(users).set({ active: false }).where(eq(users.id, u.id));
    expect(await verifyCredentials(u.email, password)).toBeNull();
  });

  it('locks at exactly the fifth failure when wrong passwords arrive all at once (21 CFR 11.300(d); 5 tries: common practice)', async () => {
    const u = await makeUser();
    const tries = 8;
    const results = await Promise.all(Array.from({ length: tries }, (_, i) => verifyCredentials(u.email, `parallel-wrong-${i}`)));
    expect(results.every((r) => r === null)).toBe(true);

    const [row] = await db.select().from(users).where(eq(users.id, u.id));
    expect(row!.lockedUntil).not.toBeNull();
    expect(row!.failedSignins).toBe(0);
    const actions = await auditActions(u.id);
    // Counted one after another under the row's lock: five failures, one lock, the rest refused.
    expect(actions.filter((a) => a === 'sign_in_failed')).toHaveLength(5);
    expect(actions.filter((a) => a === 'account_locked')).toHaveLength(1);
    expect(actions.filter((a) => a === 'sign_in_refused_locked')).toHaveLength(tries - 5);
    const notices = await db
      .select({ id: mailOutbox.id })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordType, 'user'), eq(mailOutbox.recordId, u.id)));
    const admins = await db.select({ id: users.id }).from(users).where(and(eq(users.role, 'admin'), eq(users.active, true)));
    expect(notices).toHaveLength(admins.length);
  });

  it('counts a wrong signature password even when the caller’s transaction rolls back (21 CFR 11.300(d))', async () => {
    const u = await makeUser();
    class Rollback extends Error {}
    await db
      .transaction(async (tx) => {
        await tx.select().from(users).where(eq(users.id, u.id));
        await expect(verifySignaturePassword(u.id, 'not it')).rejects.toBeInstanceOf(ValidationError);
        throw new Rollback();
      })
      .catch((err: unknown) => {
        if (!(err instanceof Rollback)) throw err;
      });
    const [row] = await db.select().from(users).where(eq(users.id, u.id));
    expect(row!.failedSignins).toBe(1);
    expect(await auditActions(u.id)).toContain('signature_password_failed');
  });

  it('keeps sign-in bookkeeping out of the account’s version, so an administrator’s open form stays current (common practice)', async () => {
    const u = await makeUser();
    for (let i = 0; i < 5; i++) await verifyCredentials(u.email, `wrong-${i}`);
    await verifyCredentials(u.email, password);
    await db.update(users).set({ lockedUntil: new Date(Date.now() - 1000) }).where(eq(users.id, u.id));
    expect(await verifyCredentials(u.email, password)).not.toBeNull();
    const [row] = await db.select().from(users).where(eq(users.id, u.id));
    expect(row).toMatchObject({ version: 1, failedSignins: 0, lockedUntil: null });
    expect(row!.lastSigninAt).not.toBeNull();
  });

  it('counts a wrong signature password toward the same lock-out (21 CFR 11.200(a), 11.300(d))', async () => {
    const u = await makeUser();
    await expect(verifySignaturePassword(u.id, 'nope')).rejects.toBeInstanceOf(ValidationError);
    await expect(verifySignaturePassword(u.id, 'nope')).rejects.toThrow(/not correct/);
    const [row] = await db.select().from(users).where(eq(users.id, u.id));
    expect(row!.failedSignins).toBe(2);
    expect(await auditActions(u.id)).toContain('signature_password_failed');
    await expect(verifySignaturePassword(u.id, password)).resolves.toBeUndefined();
  });
});
