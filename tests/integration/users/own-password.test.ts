import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, users } from '@/db/schema';
import { verifyCredentials } from '@/lib/auth/credentials';
import { hashPassword } from '@/lib/auth/passwords';
import { maxConsecutiveFailures } from '@/lib/auth/lockout';
import type { Role } from '@/lib/auth/roles';
import { ValidationError } from '@/lib/errors';
import { changeOwnPassword, createUser, resetUserPassword, type UserActor } from '@/lib/users/commands';

/*
 * People choose their own passwords. 21 CFR 11.300(b): passwords are "periodically checked,
 * recalled, or revised"; making a person replace a password an administrator set before they work
 * on is common practice, so that the password signing their records is known to them alone
 * (21 CFR 11.100(a), 11.200(a)). Each test makes its own accounts.
 */

const ownPassword = 'plumb-line-own-choice-01';
let seq = 0;
const uniqueEmail = (label: string) => `own-pw-${label}-${process.pid}-${Date.now()}-${seq++}@brackwater.example`;

async function makeUser(role: Role, mustChangePassword = false): Promise<UserActor & { email: string }> {
  const email = uniqueEmail(role);
  const name = `Own password ${role} ${seq}`;
  const [row] = await db
    .insert(users)
    .values({ email, name, role, passwordHash: await hashPassword(ownPassword), mustChangePassword })
    .$returningId();
  return { id: row!.id, name, role, email };
}

const userRow = async (id: number) => (await db.select().from(users).where(eq(users.id, id)))[0]!;

const auditFor = async (id: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, id)))
    .orderBy(asc(auditEntries.id));

const changes = (entry: { changes: string }) => JSON.parse(entry.changes) as { field: string; from: unknown; to: unknown }[];

afterAll(closeDb);

describe('an administrator-set password must be replaced', () => {
  it('marks a new account, and audits the mark as a plain yes/no (21 CFR 11.300(b); 11.10(e); common practice)', async () => {
    const admin = await makeUser('admin');
    const created = await createUser(admin, {
      name: 'Wren Halloway-Iskander',
      email: uniqueEmail('new'),
      role: 'operator',
      password: 'temporary-capsule-77',
    });
    expect((await userRow(created.id)).mustChangePassword).toBe(true);
    const [entry] = await auditFor(created.id);
    expect(changes(entry!)).toContainEqual({ field: 'mustChangePassword', from: null, to: true });
  });

  it('marks the account on a reset and records the change of the mark, never the hash (21 CFR 11.300(b); 11.10(e))', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    const temporary = 'reset-temporary-2026';
    await resetUserPassword(admin, target.id, { version: 1, password: temporary, reason: 'Forgotten at shift start' });

    const row = await userRow(target.id);
    expect(row.mustChangePassword).toBe(true);
    const entry = (await auditFor(target.id)).at(-1)!;
    expect(entry.action).toBe('password_reset');
    expect(changes(entry)).toEqual([{ field: 'mustChangePassword', from: false, to: true }]);
    expect(JSON.stringify(entry)).not.toContain(row.passwordHash);
    expect(JSON.stringify(entry)).not.toContain(temporary);
  });
});

describe('changing one’s own password', () => {
  it('sets the new password, clears the mark, and only the new password signs in (21 CFR 11.300(b); common practice)', async () => {
    const admin = await makeUser('admin');
    const person = await makeUser('supervisor');
    const temporary = 'reset-temporary-2027';
    await resetUserPassword(admin, person.id, { version: 1, password: temporary });
    const before = await userRow(person.id);
    const chosen = 'my-own-choice-for-signing';

    const updated = await changeOwnPassword(person, {
      currentPassword: temporary,
      newPassword: chosen,
      confirmPassword: chosen,
    });
    expect(updated.version).toBe(before.version + 1);

    const after = await userRow(person.id);
    expect(after.mustChangePassword).toBe(false);
    expect(after.passwordHash).not.toBe(before.passwordHash);
    expect(after.passwordChangedAt!.getTime()).toBeGreaterThanOrEqual(before.passwordChangedAt!.getTime());

    expect(await verifyCredentials(person.email, temporary)).toBeNull();
    expect(await verifyCredentials(person.email, chosen)).toMatchObject({ id: person.id });
  });

  it('audits password_changed by the person, with the cleared mark and no password or hash (21 CFR 11.10(e); OWASP ASVS 4.0.3 V7.1.1)', async () => {
    const person = await makeUser('operator', true);
    const hashBefore = (await userRow(person.id)).passwordHash;
    const chosen = 'another-own-choice-42';
    await changeOwnPassword(person, { currentPassword: ownPassword, newPassword: chosen, confirmPassword: chosen });

    const hashAfter = (await userRow(person.id)).passwordHash;
    const entry = (await auditFor(person.id)).at(-1)!;
    expect(entry).toMatchObject({ action: 'password_changed', userId: person.id, userName: person.name });
    expect(changes(entry)).toEqual([{ field: 'mustChangePassword', from: true, to: false }]);
    const stored = JSON.stringify(entry);
    for (const secret of [hashBefore, hashAfter, chosen, ownPassword]) expect(stored).not.toContain(secret);
  });

  it('refuses a wrong current password on that field, changes nothing, and counts it toward the lock-out (21 CFR 11.300(d))', async () => {
    const person = await makeUser('operator', true);
    const before = await userRow(person.id);
    const chosen = 'never-gets-stored-01';

    const err = await changeOwnPassword(person, {
      currentPassword: 'not-my-password',
      newPassword: chosen,
      confirmPassword: chosen,
    }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    const message = (err as ValidationError).fieldErrors.currentPassword?.[0];
    expect(message).toMatch(/not correct/);
    expect(message).not.toMatch(/signed/);

    const after = await userRow(person.id);
    expect(after).toMatchObject({
      passwordHash: before.passwordHash,
      mustChangePassword: true,
      version: before.version,
      failedSignins: before.failedSignins + 1,
    });
    const actions = (await auditFor(person.id)).map((e) => e.action);
    expect(actions).not.toContain('password_changed');
    expect(actions).toContain('password_change_password_failed');
  });

  it(`locks the account after ${maxConsecutiveFailures} wrong current passwords, then refuses even the right one (21 CFR 11.300(d); common practice)`, async () => {
    const person = await makeUser('operator', true);
    const chosen = 'never-gets-stored-02';
    const attempt = (currentPassword: string) =>
      changeOwnPassword(person, { currentPassword, newPassword: chosen, confirmPassword: chosen }).catch((e: unknown) => e);

    for (let i = 0; i < maxConsecutiveFailures; i++) expect(await attempt(`wrong-${i}`)).toBeInstanceOf(ValidationError);
    expect((await userRow(person.id)).lockedUntil).not.toBeNull();
    expect((await auditFor(person.id)).map((e) => e.action)).toContain('account_locked');

    const locked = await attempt(ownPassword);
    expect((locked as ValidationError).fieldErrors.currentPassword?.[0]).toMatch(/locked/);
    const row = await userRow(person.id);
    expect(row.mustChangePassword).toBe(true);
    expect(await verifyCredentials(person.email, chosen)).toBeNull();
  });

  it('names the confirmation field when the two new passwords differ, and checks nothing else (common practice)', async () => {
    const person = await makeUser('operator', true);
    const before = await userRow(person.id);
    const err = await changeOwnPassword(person, {
      currentPassword: ownPassword,
      newPassword: 'first-typing-of-it',
      confirmPassword: 'first-typing-of-if',
    }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect(Object.keys((err as ValidationError).fieldErrors)).toEqual(['confirmPassword']);
    // Refused before the password check, so a slip in typing costs no lock-out attempt.
    expect(await userRow(person.id)).toEqual(before);
  });

  it('refuses a new password equal to the current one, and one under the length the administrator’s must meet (21 CFR 11.300(b); NIST SP 800-63B §5.1.1.2 for the minimum)', async () => {
    const person = await makeUser('operator', true);
    const same = await changeOwnPassword(person, {
      currentPassword: ownPassword,
      newPassword: ownPassword,
      confirmPassword: ownPassword,
    }).catch((e: unknown) => e);
    expect((same as ValidationError).fieldErrors.newPassword?.[0]).toMatch(/different/);

    const short = await changeOwnPassword(person, {
      currentPassword: ownPassword,
      newPassword: 'too-short-1',
      confirmPassword: 'too-short-1',
    }).catch((e: unknown) => e);
    expect((short as ValidationError).fieldErrors.newPassword?.[0]).toMatch(/at least 12/);
    expect((await userRow(person.id)).mustChangePassword).toBe(true);
  });

  it('changes only the actor’s own account (21 CFR 11.10(d))', async () => {
    const person = await makeUser('operator', true);
    const bystander = await makeUser('operator', true);
    const bystanderBefore = await userRow(bystander.id);
    const chosen = 'only-mine-to-change';
    await changeOwnPassword(person, { currentPassword: ownPassword, newPassword: chosen, confirmPassword: chosen });
    expect(await userRow(bystander.id)).toEqual(bystanderBefore);
    expect(await verifyCredentials(bystander.email, chosen)).toBeNull();
  });
});
