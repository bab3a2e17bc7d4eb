import { requireUser } from '@/lib/auth/session';
import { assertCan } from '@/lib/auth/permissions';
import { createUser } from '@/lib/users/commands';
import { listUsers } from '@/lib/users/queries';
import { errorResponse, readJson } from '@/lib/users/results';
import { listUsersQuerySchema } from '@/lib/validation/users';

export async function GET(request: Request) {
  try {
    const user = await requireUser();
    assertCan(user, 'users.manage');
    const { page } = listUsersQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    return Response.json(await listUsers(page), { headers: { 'Cache-Control': 'no-store' } });
  } catch (err) {
    return errorResponse(err);
  }
}

export async function POST(request: Request) {
  try {
    const user = await requireUser();
    const created = await createUser(user, await readJson(request));
    return Response.json(created, { status: 201, headers: { Location: `/api/users/${created.id}` } });
  } catch (err) {
    return errorResponse(err);
  }
}
