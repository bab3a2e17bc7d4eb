import { requireUser } from '@/lib/auth/session';
import { assertCan } from '@/lib/auth/permissions';
import { NotFoundError } from '@/lib/errors';
import { updateUser } from '@/lib/users/commands';
import { getUser } from '@/lib/users/queries';
import { errorResponse, parseId, readJson } from '@/lib/users/results';

export async function GET(_request: Request, { params }: RouteContext<'/api/users/[id]'>) {
  try {
    const user = await requireUser();
    assertCan(user, 'users.manage');
    const found = await getUser(parseId((await params).id, 'The user'));
    if (!found) throw new NotFoundError('The user');
    return Response.json(found, { headers: { 'Cache-Control': 'no-store' } });
  } catch (err) {
    return errorResponse(err);
  }
}

/** One change per request: `{ action: 'change_role' | 'deactivate' | 'reactivate' | 'reset_password' | 'unlock', version, … }`. */
export async function PATCH(request: Request, { params }: RouteContext<'/api/users/[id]'>) {
  try {
    const user = await requireUser();
    const id = parseId((await params).id, 'The user');
    return Response.json(await updateUser(user, id, await readJson(request)));
  } catch (err) {
    return errorResponse(err);
  }
}
