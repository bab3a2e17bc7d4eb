import 'server-only';
import { and, eq } from 'drizzle-orm';
import { db, type Tx } from '../../db/client';
import { users } from '../../db/schema';
import { verifySignaturePassword } from '../auth/credentials';
import { hashPassword } from '../auth/passwords';
import { assertCan } from '../auth/permissions';
import { roleLabels } from '../auth/roles';
import { now } from '../clock';
import { NotFoundError, ValidationError, assertChanged } from '../errors';
import type { RecordActor } from '../records/kind';
import { createRecord, editRecord, lockRowsInOrder } from '../records/write-path';
import {
  changeOwnPasswordSchema,
  changeRoleSchema,
  createUserSchema,
  resetPasswordSchema,
  setActiveSchema,
  unlockUserSchema,
  userPatchSchema,
} from '../validation/users';
import { parseInput } from '../validation/parse';
import { type UserRow, userKind } from './kind';
import type { UserDto } from './queries';

/*
 * User administration. Each command takes the acting user (callers obtain it with requireUser(),
 * which re-reads role and active flag from the database) and is one call to the write path, which
 * checks users.manage (own_password: the account holder), the version, and writes the change with
 * its audit entry (21 CFR 11.10(e); EU GMP Annex 11 §12.3 on recording who created, changed or
 * cancelled access). Users are never deleted, only deactivated, so every audit entry and signature
 * keeps pointing at a real person (21 CFR 11.10(e), 11.50).
 */

export type UserActor = RecordActor;

const lastAdminMessage =
  'Plumbline needs at least one active administrator. Give another person the Administrator role first.';

/**
 * Refuses a change that takes the last active administrator away: nobody could then manage access.
 * Every active administrator is locked (in id order, after the record's own row) so two
 * administrators stepping down at once cannot both pass; the write path retries the one the
 * database stops to break the wait.
 */
async function assertAnotherAdminRemains(tx: Tx, leaving: UserRow, field?: string): Promise<void> {
  if (leaving.role !== 'admin' || !leaving.active) return;
  const admins = await lockRowsInOrder(tx, users, and(eq(users.role, 'admin'), eq(users.active, true)));
  if (!admins.some((a) => a.id !== leaving.id)) {
    throw new ValidationError(lastAdminMessage, field ? { [field]: [lastAdminMessage] } : {});
  }
}

const isDuplicateKey = (err: unknown): boolean => {
  const cause = (err as { cause?: { errno?: number } })?.cause ?? (err as { errno?: number });
  return cause?.errno === 1062;
};

const emailTaken = 'Another account already uses this e-mail address.';

export async function createUser(actor: UserActor, input: unknown): Promise<UserDto> {
  // The role first: an operator is told so before anything about the form.
  assertCan(actor, 'users.manage');
  const data = parseInput(createUserSchema, input);
  // bcrypt is slow on purpose: before the transaction, so it holds no lock meanwhile.
  const passwordHash = await hashPassword(data.password);
  try {
    const created = await createRecord(userKind, actor, 'users.manage', async (tx) => {
      const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, data.email)).limit(1);
      if (existing) throw new ValidationError(emailTaken, { email: [emailTaken] });
      return {
        action: 'user_created',
        values: {
          email: data.email,
          name: data.name,
          title: data.title,
          role: data.role,
          passwordHash,
          active: true,
          passwordChangedAt: now(),
          // The administrator chose this password, so it is not yet the person's own.
          mustChangePassword: true,
        },
      };
    });
    return created.record;
  } catch (err) {
    // Two administrators creating the same address at once: the unique index refuses the second.
    if (isDuplicateKey(err)) throw new ValidationError(emailTaken, { email: [emailTaken] });
    throw err;
  }
}

export async function changeUserRole(actor: UserActor, userId: number, input: unknown): Promise<UserDto> {
  const data = parseInput(changeRoleSchema, input);
  const out = await editRecord(userKind, {
    id: userId,
    section: 'role',
    actor,
    expectedVersion: data.version,
    action: 'role_changed',
    reason: data.reason,
    async apply(row, { tx }) {
      assertChanged('role', row.role, data.role, `${row.name} already has the ${roleLabels[data.role]} role.`);
      if (data.role !== 'admin') await assertAnotherAdminRemains(tx, row, 'role');
      return { changes: { role: data.role } };
    },
  });
  return out.record;
}

export async function deactivateUser(actor: UserActor, userId: number, input: unknown): Promise<UserDto> {
  const data = parseInput(setActiveSchema, input);
  const out = await editRecord(userKind, {
    id: userId,
    section: 'deactivation',
    actor,
    expectedVersion: data.version,
    action: 'deactivated',
    reason: data.reason,
    async apply(row, { tx }) {
      await assertAnotherAdminRemains(tx, row);
      return { changes: { active: false } };
    },
  });
  return out.record;
}

export async function reactivateUser(actor: UserActor, userId: number, input: unknown): Promise<UserDto> {
  const data = parseInput(setActiveSchema, input);
  const out = await editRecord(userKind, {
    id: userId,
    section: 'reactivation',
    actor,
    expectedVersion: data.version,
    action: 'reactivated',
    reason: data.reason,
    apply: () => ({ changes: { active: true } }),
  });
  return out.record;
}

/**
 * Sets a temporary password chosen by the administrator, which the person must replace with their
 * own before working on. The audit entry records that a reset happened and when, never the hash or
 * the password.
 */
export async function resetUserPassword(actor: UserActor, userId: number, input: unknown): Promise<UserDto> {
  const data = parseInput(resetPasswordSchema, input);
  const passwordHash = await hashPassword(data.password);
  const out = await editRecord(userKind, {
    id: userId,
    section: 'password_reset',
    actor,
    expectedVersion: data.version,
    action: 'password_reset',
    reason: data.reason,
    apply: (_row, { now }) => ({ changes: { passwordHash, passwordChangedAt: now, mustChangePassword: true } }),
  });
  return out.record;
}

/** Lifts a sign-in lock-out before it expires and clears the failure count. */
export async function unlockUser(actor: UserActor, userId: number, input: unknown): Promise<UserDto> {
  const data = parseInput(unlockUserSchema, input);
  const out = await editRecord(userKind, {
    id: userId,
    section: 'unlock',
    actor,
    expectedVersion: data.version,
    action: 'unlocked',
    reason: data.reason,
    apply: () => ({ changes: { lockedUntil: null, failedSignins: 0 } }),
  });
  return out.record;
}

const passwordChangedElsewhere =
  'Your account was changed while you were typing (perhaps an administrator reset the password). Sign in again and retry.';

/**
 * A person replaces their own password; the change is always to the actor's own account (the
 * own_password section's holder). The current password is checked first, outside any
 * transaction, so a wrong one counts toward the lock-out and is audited even though nothing else
 * happens (21 CFR 11.300(d)).
 */
export async function changeOwnPassword(actor: UserActor, input: unknown): Promise<UserDto> {
  const data = parseInput(changeOwnPasswordSchema, input);
  const [seen] = await db.select({ version: users.version }).from(users).where(eq(users.id, actor.id)).limit(1);
  if (!seen) throw new NotFoundError('Your account');
  try {
    await verifySignaturePassword(actor.id, data.currentPassword, 'password_change');
  } catch (err) {
    if (!(err instanceof ValidationError)) throw err;
    const message = err.fieldErrors.password?.[0] ?? err.message;
    throw new ValidationError(message, { currentPassword: [message] });
  }
  const passwordHash = await hashPassword(data.newPassword);
  const out = await editRecord(userKind, {
    id: actor.id,
    section: 'own_password',
    actor,
    // A reset or other change between the check and the write would otherwise be overwritten by a
    // password that was verified against the old state of the account. Sign-in bookkeeping leaves
    // the version alone, so the check's own success does not count as such a change.
    expectedVersion: seen.version,
    conflictMessage: passwordChangedElsewhere,
    action: 'password_changed',
    apply: (_row, { now }) => ({ changes: { passwordHash, mustChangePassword: false, passwordChangedAt: now } }),
  });
  return out.record;
}

/** One entry point for PATCH /api/users/:id, dispatching on `action`. */
export async function updateUser(actor: UserActor, userId: number, input: unknown): Promise<UserDto> {
  const { action, ...rest } = parseInput(userPatchSchema, input);
  switch (action) {
    case 'change_role':
      return changeUserRole(actor, userId, rest);
    case 'deactivate':
      return deactivateUser(actor, userId, rest);
    case 'reactivate':
      return reactivateUser(actor, userId, rest);
    case 'reset_password':
      return resetUserPassword(actor, userId, rest);
    case 'unlock':
      return unlockUser(actor, userId, rest);
  }
}
