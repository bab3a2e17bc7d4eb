import 'server-only';
import { and, eq, inArray, notInArray } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { users } from '../../db/schema';
import type { Role } from '../auth/roles';
import { fieldError } from '../errors';

/*
 * Who may be named for a job on a record (an investigator, a CAPA owner, an action's owner): an
 * active account with a fitting role, checked against the database, never taken on the form's word.
 */

export interface Candidate {
  id: number;
  email: string;
}

export async function assertCandidate(
  dbOrTx: DbOrTx,
  userId: number,
  rule: { roles: readonly Role[] } | { notRoles: readonly Role[] },
  refusal: { field: string; message: string },
): Promise<Candidate> {
  const [person] = await dbOrTx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(
      and(
        eq(users.id, userId),
        eq(users.active, true),
        'roles' in rule ? inArray(users.role, [...rule.roles]) : notInArray(users.role, [...rule.notRoles]),
      ),
    );
  if (!person) throw fieldError(refusal.field, refusal.message);
  return person;
}
