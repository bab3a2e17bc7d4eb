import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';
import { updateUser } from '@/lib/users/commands';
import { getVisibleUser } from '@/lib/users/detail';

function parseId(raw: string): number {
  const id = Number(raw);
  if (!/^\d+$/.test(raw) || !Number.isSafeInteger(id) || id <= 0) throw new NotFoundError('The user');
  return id;
}

export async function GET(_request: Request, { params }: RouteContext<'/api/users/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    // An account is seen by administrators and by its holder (the user kind's rule); to anyone else it is missing.
    return getVisibleUser(parseId((await params).id), user);
  });
}

/** One change per request: `{ action: 'change_role' | 'deactivate' | 'reactivate' | 'reset_password' | 'unlock', version, … }`. */
export async function PATCH(request: Request, { params }: RouteContext<'/api/users/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    return updateUser(user, parseId((await params).id), await readJson(request));
  });
}
