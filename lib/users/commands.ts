import 'server-only';
import { and, asc, eq, sql } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { users } from '../../db/schema';
import { diffFields, writeAudit } from '../audit';
import { verifySignaturePassword } from '../auth/credentials';
import { hashPassword } from '../auth/passwords';
import { assertCan, type Actor } from '../auth/permissions';
import { roleLabels } from '../auth/roles';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '../errors';
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
import { getUser, type UserDto } from './queries';

/*
 * User administration. Each command takes the acting user (callers obtain it with requireUser(),
 * which re-reads role and active flag from the database), checks users.manage (all but
 * changeOwnPassword, which touches only the actor's own account), and makes its change
 * in one transaction with the audit entry (21 CFR 11.10(e); EU GMP Annex 11 §12.3 on recording
 * who created, changed or cancelled access). Users are never deleted, only deactivated, so every
 * audit entry and signature keeps pointing at a real person (21 CFR 11.10(e), 11.50).
 *
 * `database` defaults to the pool; passing a transaction runs the command in a savepoint of it.
 */

export interface UserActor extends Actor {
  name: string;
}

/** The fields whose changes the audit trail records. Never the password hash. */
const auditedFields = [
  'email',
  'name',
  'title',
  'role',
  'active',
  'lockedUntil',
  'failedSignins',
  'mustChangePassword',
] as const;

const auditView = (u: Pick<typeof users.$inferSelect, (typeof auditedFields)[number]>) =>
  Object.fromEntries(auditedFields.map((f) => [f, u[f]])) as Record<string, unknown>;

async function lockUser(tx: DbOrTx, userId: number) {
  const [row] = await tx.select().from(users).where(eq(users.id, userId)).for('update');
  if (!row) throw new NotFoundError('The user');
  return row;
}

function assertVersion(row: { version: number }, expected: number): void {
  if (row.version !== expected) throw new ConflictError();
}

/**
 * Locks every active administrator (in id order, so concurrent commands queue instead of
 * deadlocking) and refuses a change that would leave none: nobody could then manage access.
 */
async function assertAnotherAdminRemains(tx: DbOrTx, leavingUserId: number, message: string, field?: string) {
  const admins = await tx
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.role, 'admin'), eq(users.active, true)))
    .orderBy(asc(users.id))
    .for('update');
  if (!admins.some((a) => a.id !== leavingUserId)) {
    throw new ValidationError(message, field ? { [field]: [message] } : {});
  }
}

const lastAdminMessage =
  'Plumbline needs at least one active administrator. Give another person the Administrator role first.';

async function bumpAndAudit(
  tx: DbOrTx,
  actor: UserActor,
  before: typeof users.$inferSelect,
  changes: Partial<typeof users.$inferInsert>,
  action: string,
  reason: string | undefined,
): Promise<void> {
  const updated = await tx
    .update(users)
    .set({ ...changes, version: sql`${users.version} + 1` })
    .where(and(eq(users.id, before.id), eq(users.version, before.version)));
  if (updated[0].affectedRows !== 1) throw new ConflictError();
  await writeAudit(tx, {
    actor: { id: actor.id, name: actor.name },
    recordType: 'user',
    recordId: before.id,
    action,
    changes: diffFields(auditView(before), auditView({ ...before, ...changes }), auditedFields),
    reason: reason ?? null,
  });
}

async function reload(userId: number, database: DbOrTx): Promise<UserDto> {
  const user = await getUser(userId, database);
  if (!user) throw new NotFoundError('The user');
  return user;
}

const isDuplicateKey = (err: unknown): boolean => {
  const cause = (err as { cause?: { errno?: number } })?.cause ?? (err as { errno?: number });
  return cause?.errno === 1062;
};

const emailTaken = 'Another account already uses this e-mail address.';

export async function createUser(actor: UserActor, input: unknown, database: DbOrTx = db): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const data = parseInput(createUserSchema, input);
  const passwordHash = await hashPassword(data.password);
  try {
    const id = await database.transaction(async (tx) => {
      const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, data.email)).limit(1);
      if (existing) throw new ValidationError(emailTaken, { email: [emailTaken] });
      const now = new Date();
      const values = {
        email: data.email,
        name: data.name,
        title: data.title,
        role: data.role,
        passwordHash,
        active: true,
        passwordChangedAt: now,
        // The administrator chose this password, so it is not yet the person's own.
        mustChangePassword: true,
      };
      const [inserted] = await tx.insert(users).values(values).$returningId();
      const userId = inserted!.id;
      await writeAudit(tx, {
        actor: { id: actor.id, name: actor.name },
        recordType: 'user',
        recordId: userId,
        action: 'user_created',
        changes: diffFields(null, values, ['email', 'name', 'title', 'role', 'active', 'mustChangePassword']),
      });
      return userId;
    });
    return reload(id, database);
  } catch (err) {
    if (isDuplicateKey(err)) throw new ValidationError(emailTaken, { email: [emailTaken] });
    throw err;
  }
}

export async function changeUserRole(
  actor: UserActor,
  userId: number,
  input: unknown,
  database: DbOrTx = db,
): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const data = parseInput(changeRoleSchema, input);
  await database.transaction(async (tx) => {
    if (data.role !== 'admin') await assertAnotherAdminRemains(tx, userId, lastAdminMessage, 'role');
    const before = await lockUser(tx, userId);
    assertVersion(before, data.version);
    if (before.role === data.role) {
      const same = `${before.name} already has the ${roleLabels[data.role]} role.`;
      throw new ValidationError(same, { role: [same] });
    }
    await bumpAndAudit(tx, actor, before, { role: data.role }, 'role_changed', data.reason);
  });
  return reload(userId, database);
}

export async function deactivateUser(
  actor: UserActor,
  userId: number,
  input: unknown,
  database: DbOrTx = db,
): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const data = parseInput(setActiveSchema, input);
  if (userId === actor.id) {
    throw new ForbiddenError('You cannot deactivate your own account. Ask another administrator.');
  }
  await database.transaction(async (tx) => {
    await assertAnotherAdminRemains(tx, userId, lastAdminMessage);
    const before = await lockUser(tx, userId);
    assertVersion(before, data.version);
    if (!before.active) throw new ConflictError(`${before.name} is already deactivated.`);
    await bumpAndAudit(tx, actor, before, { active: false }, 'deactivated', data.reason);
  });
  return reload(userId, database);
}

export async function reactivateUser(
  actor: UserActor,
  userId: number,
  input: unknown,
  database: DbOrTx = db,
): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const data = parseInput(setActiveSchema, input);
  await database.transaction(async (tx) => {
    const before = await lockUser(tx, userId);
    assertVersion(before, data.version);
    if (before.active) throw new ConflictError(`${before.name} is already active.`);
    await bumpAndAudit(tx, actor, before, { active: true }, 'reactivated', data.reason);
  });
  return reload(userId, database);
}

/**
 * Sets a temporary password chosen by the administrator, which the person must replace with their
 * own before working on. The audit entry records that a reset happened and when, never the hash or
 * the password.
 */
export async function resetUserPassword(
  actor: UserActor,
  userId: number,
  input: unknown,
  database: DbOrTx = db,
): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const data = parseInput(resetPasswordSchema, input);
  const passwordHash = await hashPassword(data.password);
  await database.transaction(async (tx) => {
    const before = await lockUser(tx, userId);
    assertVersion(before, data.version);
    await bumpAndAudit(
      tx,
      actor,
      before,
      { passwordHash, passwordChangedAt: new Date(), mustChangePassword: true },
      'password_reset',
      data.reason,
    );
  });
  return reload(userId, database);
}

/** Lifts a sign-in lock-out before it expires and clears the failure count. */
export async function unlockUser(
  actor: UserActor,
  userId: number,
  input: unknown,
  database: DbOrTx = db,
): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const data = parseInput(unlockUserSchema, input);
  await database.transaction(async (tx) => {
    const before = await lockUser(tx, userId);
    assertVersion(before, data.version);
    if (before.lockedUntil === null && before.failedSignins === 0) {
      throw new ConflictError(`${before.name} is not locked out.`);
    }
    await bumpAndAudit(tx, actor, before, { lockedUntil: null, failedSignins: 0 }, 'unlocked', data.reason);
  });
  return reload(userId, database);
}

const passwordChangedElsewhere =
  'Your account was changed while you were typing (perhaps an administrator reset the password). Sign in again and retry.';

/**
 * A person replaces their own password; no permission is needed beyond being signed in, and the
 * change is always to the actor's own account. The current password is checked first, outside any
 * transaction, so a wrong one counts toward the lock-out and is audited even though nothing else
 * happens (21 CFR 11.300(d)).
 */
export async function changeOwnPassword(actor: UserActor, input: unknown, database: DbOrTx = db): Promise<UserDto> {
  const data = parseInput(changeOwnPasswordSchema, input);
  const [seen] = await database.select({ version: users.version }).from(users).where(eq(users.id, actor.id)).limit(1);
  if (!seen) throw new NotFoundError('Your account');
  try {
    await verifySignaturePassword(actor.id, data.currentPassword, 'password_change');
  } catch (err) {
    if (!(err instanceof ValidationError)) throw err;
    const message = err.fieldErrors.password?.[0] ?? err.message;
    throw new ValidationError(message, { currentPassword: [message] });
  }
  const passwordHash = await hashPassword(data.newPassword);
  await database.transaction(async (tx) => {
    const before = await lockUser(tx, actor.id);
    // A reset or other change between the check and this lock would otherwise be overwritten by a
    // password that was verified against the old state of the account.
    if (before.version !== seen.version) throw new ConflictError(passwordChangedElsewhere);
    await bumpAndAudit(
      tx,
      actor,
      before,
      { passwordHash, mustChangePassword: false, passwordChangedAt: new Date() },
      'password_changed',
      undefined,
    );
  });
  return reload(actor.id, database);
}

/** One entry point for PATCH /api/users/:id, dispatching on `action`. */
export async function updateUser(
  actor: UserActor,
  userId: number,
  input: unknown,
  database: DbOrTx = db,
): Promise<UserDto> {
  assertCan(actor, 'users.manage');
  const { action, ...rest } = parseInput(userPatchSchema, input);
  switch (action) {
    case 'change_role':
      return changeUserRole(actor, userId, rest, database);
    case 'deactivate':
      return deactivateUser(actor, userId, rest, database);
    case 'reactivate':
      return reactivateUser(actor, userId, rest, database);
    case 'reset_password':
      return resetUserPassword(actor, userId, rest, database);
    case 'unlock':
      return unlockUser(actor, userId, rest, database);
  }
}
