import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';
import { updateUser } from '@/lib/users/commands';
import { getUser } from '@/lib/users/queries';

function parseId(raw: string): number {
  const id = Number(raw);
  if (!/^\d+$/.test(raw) || !Number.isSafeInteger(id) || id <= 0) throw new NotFoundError('The user');
  return id;
}

export async function GET(_request: Request, { params }: RouteContext<'/api/users/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'users.manage');
    const found = await getUser(parseId((await params).id));
    if (!found) throw new NotFoundError('The user');
    return found;
  });
}

/** One change per request: `{ action: 'change_role' | 'deactivate' | 'reactivate' | 'reset_password' | 'unlock', version, … }`. */
export async function PATCH(request: Request, { params }: RouteContext<'/api/users/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    return updateUser(user, parseId((await params).id), await readJson(request));
  });
}
