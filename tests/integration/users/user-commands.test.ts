import { and, asc, count, desc, eq, inArray } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db, type DbOrTx } from '@/db/client';
import { auditEntries, users } from '@/db/schema';
import { verifyCredentials } from '@/lib/auth/credentials';
import { hashPassword } from '@/lib/auth/passwords';
import type { Role } from '@/lib/auth/roles';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '@/lib/errors';
import {
  changeUserRole,
  createUser,
  deactivateUser,
  reactivateUser,
  resetUserPassword,
  unlockUser,
  updateUser,
  type UserActor,
} from '@/lib/users/commands';

/*
 * User administration against the real database. Each test makes its own accounts with unique
 * e-mail addresses, so tests do not depend on each other or on the demo data.
 */

const knownPassword = 'plumb-line-initial-01';
let seq = 0;
const uniqueEmail = (label: string) => `users-${label}-${process.pid}-${Date.now()}-${seq++}@brackwater.example`;

async function makeUser(role: Role, database: DbOrTx = db): Promise<UserActor & { email: string }> {
  const email = uniqueEmail(role);
  const name = `Test ${role} ${seq}`;
  const [row] = await database
    .insert(users)
    .values({ email, name, role, passwordHash: await hashPassword(knownPassword) })
    .$returningId();
  return { id: row!.id, name, role, email };
}

const userRow = async (id: number, database: DbOrTx = db) =>
  (await database.select().from(users).where(eq(users.id, id)))[0]!;

const auditFor = async (id: number, database: DbOrTx = db) =>
  database
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, id)))
    .orderBy(asc(auditEntries.id));

const newUserInput = (overrides: Record<string, unknown> = {}) => ({
  name: 'Wren Halloway-Iskander',
  email: uniqueEmail('new'),
  title: 'Line operator, Room 2',
  role: 'operator',
  password: 'temporary-capsule-77',
  ...overrides,
});

/**
 * Runs `body` while the given people are the only active administrators: every other active
 * administrator is set inactive for the duration and put back afterwards, so the last-administrator
 * rule can be met. The commands run on the write path's own transactions, so a rolled-back outer
 * transaction cannot hold this state for them; integration files run one at a time.
 */
async function withOnlyActiveAdmins(keep: readonly number[], body: () => Promise<void>): Promise<void> {
  const others = (await db.select({ id: users.id }).from(users).where(and(eq(users.role, 'admin'), eq(users.active, true))))
    .map((u) => u.id)
    .filter((id) => !keep.includes(id));
  if (others.length > 0) await db.update(users).set({ active: false }).where(inArray(users.id, others));
  try {
    await body();
  } finally {
    if (others.length > 0) await db.update(users).set({ active: true }).where(inArray(users.id, others));
  }
}

afterAll(closeDb);

describe('creating a user', () => {
  it('creates the account and audits who created it with every recorded field (21 CFR 11.10(e); EU GMP Annex 11 §12.3)', async () => {
    const admin = await makeUser('admin');
    const input = newUserInput({ email: `  ${uniqueEmail('Mixed').toUpperCase()} ` });
    const created = await createUser(admin, input);

    expect(created).toMatchObject({
      name: input.name,
      email: String(input.email).trim().toLowerCase(),
      title: input.title,
      role: 'operator',
      active: true,
      version: 1,
    });
    expect(created).not.toHaveProperty('passwordHash');

    const trail = await auditFor(created.id);
    expect(trail).toHaveLength(1);
    const entry = trail[0]!;
    expect(entry).toMatchObject({ action: 'user_created', userId: admin.id, userName: admin.name });
    const changes = JSON.parse(entry.changes) as { field: string; from: unknown; to: unknown }[];
    expect(Object.fromEntries(changes.map((c) => [c.field, [c.from, c.to]]))).toEqual({
      active: [null, true],
      email: [null, created.email],
      name: [null, input.name],
      role: [null, 'operator'],
      title: [null, input.title],
      // The administrator chose the password, so the person must replace it (21 CFR 11.300(b); common practice).
      mustChangePassword: [null, true],
      // The lock-out count starts at nothing failed; every field the kind audits is recorded at creation.
      failedSignins: [null, 0],
    });

    // The new person can sign in with the password the administrator set.
    expect(await verifyCredentials(created.email, String(input.password))).toMatchObject({ id: created.id });
  });

  it('keeps the password and its hash out of the audit trail (OWASP ASVS 4.0.3 V7.1.1)', async () => {
    const admin = await makeUser('admin');
    const input = newUserInput();
    const created = await createUser(admin, input);
    const row = await userRow(created.id);
    const [entry] = await auditFor(created.id);
    const stored = JSON.stringify(entry);
    expect(stored).not.toContain(row.passwordHash);
    expect(stored).not.toContain(String(input.password));
    // The only password-related field recorded is the yes/no mark that it must be replaced.
    const fields = (JSON.parse(entry!.changes) as { field: string; to: unknown }[]).filter((c) => /password/i.test(c.field));
    expect(fields).toEqual([{ field: 'mustChangePassword', from: null, to: true }]);
  });

  it('refuses a QA approver, and creates nothing (21 CFR 11.10(d), 11.10(g))', async () => {
    const approver = await makeUser('qa_approver');
    const input = newUserInput();
    await expect(createUser(approver, input)).rejects.toBeInstanceOf(ForbiddenError);
    const [found] = await db.select({ n: count() }).from(users).where(eq(users.email, String(input.email)));
    expect(found!.n).toBe(0);
  });

  it('refuses every role other than administrator (21 CFR 11.10(g))', async () => {
    for (const role of ['operator', 'supervisor', 'qa_investigator'] as const) {
      const actor = await makeUser(role);
      await expect(createUser(actor, newUserInput())).rejects.toBeInstanceOf(ForbiddenError);
    }
  });

  it('names each field that is wrong, including a password under 12 characters (site policy above the NIST SP 800-63B §5.1.1.2 minimum of 8)', async () => {
    const admin = await makeUser('admin');
    const err = await createUser(admin, newUserInput({ name: ' ', email: 'not-an-address', role: 'boss', password: 'short-pw-11' })).catch(
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(ValidationError);
    expect(Object.keys((err as ValidationError).fieldErrors).sort()).toEqual(['email', 'name', 'password', 'role']);
  });

  it('refuses an e-mail address that another account already uses (one account per person: 21 CFR 11.100(a))', async () => {
    const admin = await makeUser('admin');
    const existing = await makeUser('operator');
    const err = await createUser(admin, newUserInput({ email: existing.email.toUpperCase() })).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.email?.[0]).toMatch(/already uses/);
  });
});

describe('changing a user', () => {
  it('changes the role with the expected version, bumps the version and audits from → to with the reason (21 CFR 11.10(e))', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    const updated = await changeUserRole(admin, target.id, { version: '1', role: 'supervisor', reason: 'Promoted to shift lead' });
    expect(updated).toMatchObject({ role: 'supervisor', version: 2 });

    const [entry] = (await auditFor(target.id)).reverse();
    expect(entry).toMatchObject({ action: 'role_changed', userId: admin.id, reason: 'Promoted to shift lead' });
    expect(JSON.parse(entry!.changes)).toEqual([{ field: 'role', from: 'operator', to: 'supervisor' }]);
  });

  it('refuses a stale version with ConflictError and changes nothing (common practice: optimistic locking, no lost update)', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    await changeUserRole(admin, target.id, { version: 1, role: 'supervisor', reason: 'First change' });
    const before = await userRow(target.id);
    const trailBefore = await auditFor(target.id);

    await expect(
      changeUserRole(admin, target.id, { version: 1, role: 'qa_investigator', reason: 'Made from an old page' }),
    ).rejects.toBeInstanceOf(ConflictError);
    await expect(deactivateUser(admin, target.id, { version: 1, reason: 'Made from an old page' })).rejects.toBeInstanceOf(
      ConflictError,
    );

    const after = await userRow(target.id);
    expect(after).toEqual(before);
    expect(await auditFor(target.id)).toHaveLength(trailBefore.length);
  });

  it('answers NotFoundError for an account that does not exist', async () => {
    const admin = await makeUser('admin');
    await expect(changeUserRole(admin, 2_000_000_000, { version: 1, role: 'operator', reason: 'No such person' })).rejects.toBeInstanceOf(
      NotFoundError,
    );
  });

  it('requires a reason for a role change (EU GMP Annex 11 §9: the reason for a change is documented)', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    const err = await changeUserRole(admin, target.id, { version: 1, role: 'supervisor', reason: ' ' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.reason).toBeDefined();
    expect((await userRow(target.id)).role).toBe('operator');
  });
});

describe('deactivating and reactivating', () => {
  it('deactivates without deleting, audits it with the reason, and the person can no longer sign in (21 CFR 11.10(d), 11.10(e))', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('supervisor');
    const updated = await deactivateUser(admin, target.id, { version: 1, reason: 'Left the company' });
    expect(updated).toMatchObject({ active: false, version: 2 });

    const [entry] = (await auditFor(target.id)).reverse();
    expect(entry).toMatchObject({ action: 'deactivated', userId: admin.id, userName: admin.name, reason: 'Left the company' });
    expect(JSON.parse(entry!.changes)).toEqual([{ field: 'active', from: true, to: false }]);
    expect(await verifyCredentials(target.email, knownPassword)).toBeNull();

    const back = await reactivateUser(admin, target.id, { version: 2, reason: 'Returned after leave' });
    expect(back).toMatchObject({ active: true, version: 3 });
    expect((await auditFor(target.id)).map((e) => e.action)).toContain('reactivated');
    expect(await verifyCredentials(target.email, knownPassword)).toMatchObject({ id: target.id });
  });

  it('refuses an administrator deactivating their own account (common practice: no self-removal of access)', async () => {
    const admin = await makeUser('admin');
    await expect(deactivateUser(admin, admin.id, { version: 1, reason: 'Testing' })).rejects.toBeInstanceOf(ForbiddenError);
    expect((await userRow(admin.id)).active).toBe(true);
  });

  it('refuses to deactivate the last active administrator (common practice: access must stay manageable, EU GMP Annex 11 §12)', async () => {
    // Actor A passed requireUser, then was deactivated by B before A's own command ran; every
    // other administrator is inactive, so B is the last one.
    const a = await makeUser('admin');
    const b = await makeUser('admin');
    await db.update(users).set({ active: false }).where(eq(users.id, a.id));
    await withOnlyActiveAdmins([b.id], async () => {
      const trailBefore = await auditFor(b.id);
      const err = await deactivateUser(a, b.id, { version: 1, reason: 'Last one out' }).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(ValidationError);
      expect((err as Error).message).toMatch(/at least one active administrator/);
      expect(await userRow(b.id)).toMatchObject({ active: true, version: 1 });
      expect(await auditFor(b.id)).toHaveLength(trailBefore.length);
    });
  });

  it('refuses to take the administrator role from the last active administrator', async () => {
    const only = await makeUser('admin');
    await withOnlyActiveAdmins([only.id], async () => {
      const err = await changeUserRole(only, only.id, { version: 1, role: 'qa_approver', reason: 'Changing jobs' }).catch(
        (e: unknown) => e,
      );
      expect(err).toBeInstanceOf(ValidationError);
      expect((err as ValidationError).fieldErrors.role?.[0]).toMatch(/at least one active administrator/);
      expect(await userRow(only.id)).toMatchObject({ role: 'admin', version: 1 });
    });
  });

  it('lets only one of the last two administrators step down when both try at once (common practice, EU GMP Annex 11 §12)', async () => {
    const a = await makeUser('admin');
    const b = await makeUser('admin');
    await withOnlyActiveAdmins([a.id, b.id], async () => {
      const results = await Promise.allSettled([
        changeUserRole(a, a.id, { version: 1, role: 'qa_approver', reason: 'Moving to QA' }),
        changeUserRole(b, b.id, { version: 1, role: 'supervisor', reason: 'Moving to the floor' }),
      ]);
      expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
      const refused = results.filter((r): r is PromiseRejectedResult => r.status === 'rejected');
      expect(refused).toHaveLength(1);
      expect(refused[0]!.reason).toBeInstanceOf(ValidationError);
      expect((refused[0]!.reason as Error).message).toMatch(/at least one active administrator/);
      const roles = [(await userRow(a.id)).role, (await userRow(b.id)).role];
      expect(roles.filter((r) => r === 'admin')).toHaveLength(1);
    });
  });

  it('lets an administrator step down while another administrator remains', async () => {
    const stays = await makeUser('admin');
    const leaves = await makeUser('admin');
    expect(stays.id).not.toBe(leaves.id);
    const updated = await changeUserRole(leaves, leaves.id, { version: 1, role: 'qa_approver', reason: 'Moved to QA' });
    expect(updated.role).toBe('qa_approver');
  });
});

describe('passwords and lock-outs', () => {
  it('resets the password, records only that it happened, and the new password works (21 CFR 11.300(b); OWASP ASVS 4.0.3 V7.1.1)', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    const hashBefore = (await userRow(target.id)).passwordHash;
    const newPassword = 'reset-by-admin-2026';

    const updated = await resetUserPassword(admin, target.id, { version: 1, password: newPassword, reason: 'Forgotten' });
    expect(updated.version).toBe(2);
    const row = await userRow(target.id);
    expect(row.passwordHash).not.toBe(hashBefore);

    const [entry] = (await auditFor(target.id)).reverse();
    expect(entry).toMatchObject({ action: 'password_reset', userId: admin.id, reason: 'Forgotten' });
    const stored = JSON.stringify(entry);
    expect(stored).not.toContain(row.passwordHash);
    expect(stored).not.toContain(hashBefore);
    expect(stored).not.toContain(newPassword);

    expect(await verifyCredentials(target.email, knownPassword)).toBeNull();
    expect(await verifyCredentials(target.email, newPassword)).toMatchObject({ id: target.id });
  });

  it('unlocks a locked-out account and audits the lifted lock (21 CFR 11.300(d))', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    const until = new Date(Date.now() + 10 * 60_000);
    await db.update(users).set({ lockedUntil: until }).where(eq(users.id, target.id));
    expect(await verifyCredentials(target.email, knownPassword)).toBeNull();

    await unlockUser(admin, target.id, { version: 1 });
    const row = await userRow(target.id);
    expect(row.lockedUntil).toBeNull();
    const [entry] = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, target.id), eq(auditEntries.action, 'unlocked')))
      .orderBy(desc(auditEntries.id));
    expect(JSON.parse(entry!.changes)).toEqual([{ field: 'lockedUntil', from: until.toISOString(), to: null }]);
    expect(await verifyCredentials(target.email, knownPassword)).toMatchObject({ id: target.id });
  });
});

describe('the PATCH entry point', () => {
  it('dispatches on action, refuses an unknown action, and answers an account the person may not see as missing', async () => {
    const admin = await makeUser('admin');
    const target = await makeUser('operator');
    expect(await updateUser(admin, target.id, { action: 'change_role', version: 1, role: 'supervisor', reason: 'Cover' })).toMatchObject({
      role: 'supervisor',
    });
    await expect(updateUser(admin, target.id, { action: 'delete', version: 2 })).rejects.toBeInstanceOf(ValidationError);
    // Another person's account is not the supervisor's to see: missing, before anything else (21 CFR 11.10(d)).
    await expect(updateUser(await makeUser('supervisor'), target.id, { action: 'unlock', version: 2 })).rejects.toBeInstanceOf(
      NotFoundError,
    );
  });
});
