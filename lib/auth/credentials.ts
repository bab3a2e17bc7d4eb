import 'server-only';
import { and, eq, ne } from 'drizzle-orm';
import { db, type DbOrTx, type Tx } from '../../db/client';
import { users } from '../../db/schema';
import { now } from '../clock';
import { getEnv } from '../env';
import { ValidationError } from '../errors';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import { noteOnRecord } from '../records/notes';
import { writeTransaction } from '../records/transaction';
import { lockRowsInOrder, writeConsequence } from '../records/rows';
import { userKind } from '../users/kind';
import { afterFailure, isLocked, lockMinutes, maxConsecutiveFailures } from './lockout';
import { decoyHash, verifyPassword } from './passwords';
import type { Role } from './roles';

/*
 * Password checks for sign-in and for electronic signatures (21 CFR 11.200(a): a signature is
 * executed with both components, user id and password). Failures of either kind count toward the
 * same lock-out, and the lock is written to the audit trail (21 CFR 11.300(d)).
 */

export interface AuthenticatedUser {
  id: number;
  email: string;
  name: string;
  role: Role;
}

/** What the password was entered for; each is audited under its own name and counts toward one lock-out. */
export type Purpose = 'sign_in' | 'signature' | 'password_change';

const purposeWords: Record<Purpose, string> = {
  sign_in: 'sign-in attempts',
  signature: 'password entries for an electronic signature',
  password_change: 'password entries to change the password',
};

/*
 * 21 CFR 11.300(d) asks that attempted unauthorised use be reported "in an immediate and urgent
 * manner": every active administrator is e-mailed through the outbox, in the same transaction as
 * the lock, so the notice goes if and only if the lock is recorded.
 */
async function notifyAdministratorsOfLock(
  tx: Tx,
  user: { id: number; name: string; email: string },
  lockedUntil: Date,
  purpose: Purpose,
): Promise<void> {
  const admins = await tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(eq(users.active, true), eq(users.role, 'admin'), ne(users.id, user.id)));
  const env = getEnv();
  const what = purposeWords[purpose];
  const mail = renderMailLayout({
    siteName: env.SITE_NAME,
    heading: `Account locked: ${user.name}`,
    paragraphs: [
      `The account of ${user.name} (${user.email}) was locked after ${maxConsecutiveFailures} consecutive failed ${what}.`,
      `It unlocks by itself at ${lockedUntil.toISOString().replace('T', ' ').slice(0, 16)} UTC, or an administrator can unlock it sooner.`,
      'If the account holder did not make these attempts, treat it as attempted unauthorised use and follow the site procedure.',
    ],
    link: { url: new URL(`/admin/users/${user.id}`, env.APP_URL).toString(), label: 'Open the account' },
    footer: 'You receive this because you are a Plumbline administrator.',
  });
  for (const admin of admins) {
    await enqueueMail(tx, {
      dedupeKey: `account-locked:${user.id}:${lockedUntil.getTime()}:${admin.id}`,
      template: 'account_locked',
      to: { address: admin.email, userId: admin.id },
      subject: `Account locked after failed attempts: ${user.name}`,
      text: mail.text,
      html: mail.html,
      recordType: 'user',
      recordId: user.id,
    });
  }
}

/** `changed`: the password kept changing while it was compared; nothing was counted. */
type Outcome = 'ok' | 'wrong_password' | 'locked' | 'inactive' | 'changed';
type AttemptResult = { outcome: Outcome; user?: AuthenticatedUser };

/** How often a password is compared again when the stored hash changed while it was being compared. */
const maxComparisons = 3;

/**
 * One attempt against one account. bcrypt is slow on purpose, so the password is compared first,
 * against the hash as read without a lock; then a write transaction of its own (never the
 * caller's, so a failure is counted even if the caller rolls back) locks the account row and
 * decides from the row as it stands under the lock. Concurrent attempts therefore count one after
 * another, and the account locks at exactly the fifth consecutive failure. If the hash changed in
 * between (a reset, a new password), the comparison was against the old one and is made again.
 *
 * The bookkeeping (failure count, lock, last sign-in) is a consequence of the attempt, audited
 * but leaving the account's version alone: an administrator's open form stays current.
 */
async function attempt(userId: number, password: string, purpose: Purpose): Promise<AttemptResult> {
  for (let comparison = 1; comparison <= maxComparisons; comparison++) {
    const [seen] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
    if (!seen) return { outcome: 'wrong_password' };
    const passwordOk = await verifyPassword(password, seen.passwordHash);
    const result = await writeTransaction((tx) => recordAttempt(tx, userId, seen.passwordHash, passwordOk, purpose));
    if (result) return result;
  }
  return { outcome: 'changed' };
}

/** Null when the hash compared is no longer the account's; nothing is written then. */
async function recordAttempt(
  tx: Tx,
  userId: number,
  comparedHash: string,
  passwordOk: boolean,
  purpose: Purpose,
): Promise<AttemptResult | null> {
  const [user] = await lockRowsInOrder(tx, users, eq(users.id, userId));
  if (!user) return { outcome: 'wrong_password' };
  if (user.passwordHash !== comparedHash) return null;
  if (!user.active) return { outcome: 'inactive' };
  const at = now();
  const actor = { id: user.id, name: user.name };
  if (isLocked(user.lockedUntil, at)) {
    await noteOnRecord(tx, userKind, user.id, { actor, action: `${purpose}_refused_locked` });
    return { outcome: 'locked' };
  }

  const bookkeeping = (action: string, changes: Partial<typeof users.$inferInsert>, reason: string | null = null) =>
    writeConsequence(tx, userKind, user.id, { actor, action, reason, bumpsVersion: false, changes: () => changes });

  if (passwordOk) {
    if (purpose === 'sign_in') {
      await bookkeeping('signed_in', { failedSignins: 0, lockedUntil: null, lastSigninAt: at });
    } else if (user.failedSignins > 0) {
      // A right password ends the run of consecutive failures, whatever it was entered for.
      await bookkeeping(`${purpose}_password_accepted`, { failedSignins: 0 });
    }
    return { outcome: 'ok', user: { id: user.id, email: user.email, name: user.name, role: user.role } };
  }

  const next = afterFailure(user.failedSignins, at);
  const failed = purpose === 'sign_in' ? 'sign_in_failed' : `${purpose}_password_failed`;
  if (!next.lockedUntil) {
    await bookkeeping(failed, { failedSignins: next.failedSignins });
    return { outcome: 'wrong_password' };
  }
  // The fifth failure is counted as such, then the lock starts the count again.
  await bookkeeping(failed, { failedSignins: maxConsecutiveFailures });
  await bookkeeping(
    'account_locked',
    { failedSignins: next.failedSignins, lockedUntil: next.lockedUntil },
    `${maxConsecutiveFailures} consecutive failed password entries; locked for ${lockMinutes} minutes`,
  );
  await notifyAdministratorsOfLock(tx, user, next.lockedUntil, purpose);
  return { outcome: 'wrong_password' };
}

/**
 * Sign-in check. Returns the user, or null for every kind of failure alike (unknown e-mail, wrong
 * password, locked, deactivated) so the caller cannot hint whether an account exists.
 */
export async function verifyCredentials(email: string, password: string): Promise<AuthenticatedUser | null> {
  const [row] = await db
    .select({ id: users.id })
    .from(users)
    .where(eq(users.email, email.trim().toLowerCase()))
    .limit(1);
  if (!row) {
    await verifyPassword(password, decoyHash);
    return null;
  }
  const result = await attempt(row.id, password, 'sign_in');
  return result.outcome === 'ok' ? result.user! : null;
}

const consequence: Record<Exclude<Purpose, 'sign_in'>, string> = {
  signature: 'Nothing was signed.',
  password_change: 'Your password was not changed.',
};

function refusal(outcome: Exclude<Outcome, 'ok'>, purpose: Exclude<Purpose, 'sign_in'>): string {
  if (outcome === 'wrong_password') return `The password is not correct. ${consequence[purpose]}`;
  if (outcome === 'locked') {
    return `Your account is locked after ${maxConsecutiveFailures} failed attempts. Try again in ${lockMinutes} minutes or ask an administrator.`;
  }
  if (outcome === 'changed') return `Your password was changed while it was being checked. Enter it again. ${consequence[purpose]}`;
  return 'Your account is deactivated.';
}

/**
 * Re-checks the signer's password for an electronic signature. Call it BEFORE opening the
 * transaction that records the signature: a wrong password is counted and audited in a
 * transaction of its own, which must not wait on locks the caller's transaction holds.
 * Throws ValidationError with a message on the `password` field.
 */
export async function verifySignaturePassword(
  userId: number,
  password: string,
  purpose: Exclude<Purpose, 'sign_in'> = 'signature',
): Promise<void> {
  if (!password) {
    const message = purpose === 'signature' ? 'Enter your password to sign.' : 'Enter your current password.';
    throw new ValidationError(message, { password: [message] });
  }
  const { outcome } = await attempt(userId, password, purpose);
  if (outcome !== 'ok') {
    const message = refusal(outcome, purpose);
    throw new ValidationError(message, { password: [message] });
  }
}

/**
 * The same check for callers already inside a transaction. Safe only while that transaction has
 * not yet written to the audit trail (the failure is recorded on a separate connection, which
 * takes the audit chain lock).
 */
export async function checkPasswordForSignature(_tx: DbOrTx, userId: number, password: string): Promise<boolean> {
  try {
    await verifySignaturePassword(userId, password);
    return true;
  } catch (err) {
    if (err instanceof ValidationError) return false;
    throw err;
  }
}
