import 'server-only';
import { and, eq, ne } from 'drizzle-orm';
import { db, type DbOrTx, type Tx } from '../../db/client';
import { users } from '../../db/schema';
import { writeAudit } from '../audit';
import { getEnv } from '../env';
import { ValidationError } from '../errors';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
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

type Outcome = 'ok' | 'wrong_password' | 'locked' | 'inactive';

/** One attempt against one account, in its own transaction so a failure is counted even if the caller rolls back. */
async function attempt(
  userId: number,
  password: string,
  purpose: Purpose,
): Promise<{ outcome: Outcome; user?: AuthenticatedUser }> {
  return db.transaction(async (tx) => {
    const [user] = await tx.select().from(users).where(eq(users.id, userId)).for('update');
    if (!user) return { outcome: 'wrong_password' as const };
    const now = new Date();
    const passwordOk = await verifyPassword(password, user.passwordHash);
    if (!user.active) return { outcome: 'inactive' as const };
    const actor = { id: user.id, name: user.name };
    if (isLocked(user.lockedUntil, now)) {
      await writeAudit(tx, {
        actor,
        recordType: 'user',
        recordId: user.id,
        action: `${purpose}_refused_locked`,
      });
      return { outcome: 'locked' as const };
    }

    if (passwordOk) {
      if (purpose === 'sign_in') {
        await tx
          .update(users)
          .set({ failedSignins: 0, lockedUntil: null, lastSigninAt: now })
          .where(eq(users.id, user.id));
        await writeAudit(tx, { actor, recordType: 'user', recordId: user.id, action: 'signed_in' });
      } else if (user.failedSignins > 0) {
        await tx.update(users).set({ failedSignins: 0 }).where(eq(users.id, user.id));
      }
      return { outcome: 'ok' as const, user: { id: user.id, email: user.email, name: user.name, role: user.role } };
    }

    const next = afterFailure(user.failedSignins, now);
    await tx.update(users).set(next).where(eq(users.id, user.id));
    await writeAudit(tx, {
      actor,
      recordType: 'user',
      recordId: user.id,
      action: purpose === 'sign_in' ? 'sign_in_failed' : `${purpose}_password_failed`,
      changes: [{ field: 'failedSignins', from: user.failedSignins, to: next.lockedUntil ? maxConsecutiveFailures : next.failedSignins }],
    });
    if (next.lockedUntil) {
      await writeAudit(tx, {
        actor,
        recordType: 'user',
        recordId: user.id,
        action: 'account_locked',
        changes: [{ field: 'lockedUntil', from: user.lockedUntil, to: next.lockedUntil }],
        reason: `${maxConsecutiveFailures} consecutive failed password entries; locked for ${lockMinutes} minutes`,
      });
      await notifyAdministratorsOfLock(tx, user, next.lockedUntil, purpose);
    }
    return { outcome: 'wrong_password' as const };
  });
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
