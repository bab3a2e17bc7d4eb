import 'server-only';
import { eq } from 'drizzle-orm';
import { forbidden, redirect } from 'next/navigation';
import { cache } from 'react';
import { db } from '../../db/client';
import { users } from '../../db/schema';
import { UnauthenticatedError } from '../errors';
import { auth } from './config';
import { assertCan, can, type Permission } from './permissions';
import type { Role } from './roles';

/*
 * Who is asking. The session cookie names a user; the database decides whether that user still
 * exists, is active and which role they hold now.
 */

export interface CurrentUser {
  id: number;
  email: string;
  name: string;
  title: string;
  role: Role;
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
    })
    .from(users)
    .where(eq(users.id, id))
    .limit(1);
  if (!row || !row.active) return null;
  const { active: _active, ...user } = row;
  return user;
});

/** For commands and route handlers: throws UnauthenticatedError when nobody valid is signed in. */
export async function requireUser(): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) throw new UnauthenticatedError();
  return user;
}

/** For commands and route handlers that need one permission: throws ForbiddenError with a reason. */
export async function requireUserWith(permission: Permission): Promise<CurrentUser> {
  const user = await requireUser();
  assertCan(user, permission);
  return user;
}

/**
 * For server components: sends a signed-out visitor to the sign-in page, returning to `returnTo`
 * afterwards (pages pass their own path; layouts cannot know it), and shows the forbidden page
 * when the role lacks the permission.
 */
export async function requirePageUser(
  permission?: Permission,
  options: { returnTo?: string } = {},
): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) {
    const returnTo = options.returnTo?.startsWith('/') && !options.returnTo.startsWith('//') ? options.returnTo : '/';
    redirect(`/sign-in?callbackUrl=${encodeURIComponent(returnTo)}`);
  }
  if (permission && !can(user, permission)) forbidden();
  return user;
}
