import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { createCapa } from '@/lib/capa/commands';
import { parseCapaListQueryStrict } from '@/lib/capa/list-query';
import { listCapas } from '@/lib/capa/queries';
import { readJson, respond } from '@/lib/define-action';

/**
 * GET /api/capa?page=&pageSize=&sort=number|created|due|status&dir=&status=&source=&ownerId=&overdue=
 * → { page, pageSize, total, sort, dir, rows }; a bad parameter is a 422 naming it.
 * POST /api/capa { title, sourceType: deviation|complaint|trend, sourceId?, problemStatement,
 * rootCause?, ownerId, dueAt? (YYYY-MM-DD) } → 201 { record, allowedEvents, signature: null }.
 */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'capa.read');
    return listCapas(parseCapaListQueryStrict(new URL(request.url).searchParams), user);
  });
}

export async function POST(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    return createCapa(user, (await readJson(request)) as Parameters<typeof createCapa>[1]);
  }, 201);
}
