import { requireUser } from '@/lib/auth/session';
import { assertCan } from '@/lib/auth/permissions';
import { listBatches, parseBatchListQuery } from '@/lib/master-data/queries';
import { errorResponse } from '@/lib/users/results';

/** GET /api/batches?page=&status= → { page, pageSize, total, status, rows }, 50 a page, newest first. */
export async function GET(request: Request) {
  try {
    const user = await requireUser();
    assertCan(user, 'batch.read');
    const query = parseBatchListQuery(Object.fromEntries(new URL(request.url).searchParams));
    return Response.json(await listBatches(query), { headers: { 'Cache-Control': 'no-store' } });
  } catch (err) {
    return errorResponse(err);
  }
}
