import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { respond } from '@/lib/define-action';
import { listBatches, parseBatchListQuery } from '@/lib/master-data/queries';

/** GET /api/batches?page=&status= → { page, pageSize, total, status, rows }, 50 a page, newest first. */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'batch.read');
    return listBatches(parseBatchListQuery(Object.fromEntries(new URL(request.url).searchParams)));
  });
}
