import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { createUser } from '@/lib/users/commands';
import { listUsers } from '@/lib/users/queries';
import { listUsersQuerySchema } from '@/lib/validation/users';

/** GET /api/users?page= → { page, pageSize, total, rows }, 50 a page, active accounts first. */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'users.manage');
    const { page } = listUsersQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    return listUsers(page);
  });
}

/** POST /api/users { name, email, title, role, password } → 201 with the new account. */
export async function POST(request: Request) {
  return respond(async () => createUser(await requireUser(), await readJson(request)), 201);
}
