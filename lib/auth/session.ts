import 'server-only';
import { eq } from 'drizzle-orm';
import { forbidden, redirect } from 'next/navigation';
import { cache } from 'react';
import { db } from '../../db/client';
import { users } from '../../db/schema';
import { ForbiddenError, UnauthenticatedError } from '../errors';
import { auth } from './config';
import { assertCan, can, type Permission } from './permissions';
import type { Role } from './roles';

/*
 * Who is asking. The session cookie names a user; the database decides whether that user still
 * exists, is active, which role they hold now, and whether they still work under a password an
 * administrator chose. Such a person may do one thing only, choose their own password
 * (/account/password): a password someone else knows does not make entries attributable to
 * its holder alone (21 CFR 11.300(b), 11.100(a); replacing it at first use is common practice).
 */

export interface CurrentUser {
  id: number;
  email: string;
  name: string;
  title: string;
  role: Role;
  /** True while the password is one an administrator set. */
  mustChangePassword: boolean;
}

/** Where a person with an administrator-set password is sent. */
export const changePasswordPath = '/account/password';

export const choosePasswordFirst = 'Choose your own password first (Change password, next to your name).';

/** Only the change-password page and its action pass this. */
export interface PasswordChangeOption {
  allowPasswordChange?: true;
}

/** Once per request (React cache): the signed-in, active user, or null. */
export const getCurrentUser = cache(async (): Promise<CurrentUser | null> => {
  const session = await auth();
  const id = Number(session?.user?.id);
  if (!Number.isInteger(id) || id <= 0) return null;
  const [row] = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      title: users.title,
      role: users.role,
      active: users.active,
      mustChangePassword: users.mustChangePassword,
    })
    .from(users)
    .where(eq(users.id, id))
    .limit(1);
  if (!row || !row.active) return null;
  const { active: _active, ...user } = row;
  return user;
});

/**
 * For commands and route handlers: throws UnauthenticatedError when nobody valid is signed in, and
 * ForbiddenError while the person still has to choose their own password.
 */
export async function requireUser(options: PasswordChangeOption = {}): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) throw new UnauthenticatedError();
  if (user.mustChangePassword && !options.allowPasswordChange) throw new ForbiddenError(choosePasswordFirst);
  return user;
}

/** For commands and route handlers that need one permission: throws ForbiddenError with a reason. */
export async function requireUserWith(permission: Permission): Promise<CurrentUser> {
  const user = await requireUser();
  assertCan(user, permission);
  return user;
}

/** A path inside this site, or '/': never another origin (`//host`) taken from a query string. */
export function safeReturnPath(path: string | undefined): string {
  return path?.startsWith('/') && !path.startsWith('//') && !path.startsWith('/\\') ? path : '/';
}

/**
 * For server components: sends a signed-out visitor to the sign-in page, returning to `returnTo`
 * afterwards (pages pass their own path; layouts cannot know it), sends a person who must choose
 * their own password to that page first (returning to `returnTo` after), and shows the forbidden
 * page when the role lacks the permission.
 */
export async function requirePageUser(
  permission?: Permission,
  options: { returnTo?: string } & PasswordChangeOption = {},
): Promise<CurrentUser> {
  const user = await getCurrentUser();
  const returnTo = safeReturnPath(options.returnTo);
  if (!user) redirect(`/sign-in?callbackUrl=${encodeURIComponent(returnTo)}`);
  if (user.mustChangePassword && !options.allowPasswordChange) {
    redirect(returnTo === '/' ? changePasswordPath : `${changePasswordPath}?returnTo=${encodeURIComponent(returnTo)}`);
  }
  if (permission && !can(user, permission)) forbidden();
  return user;
}
