import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { respond } from '@/lib/define-action';
import { listDeviations } from '@/lib/deviations/queries';
import { parseDeviationListQueryStrict } from '@/lib/validation/deviation-list';

/**
 * GET /api/deviations?page=&pageSize=&sort=&dir=&status=&classification=&productId=&batchId=&lot=
 * &machineId=&ringId=&defectId=&ownerId=&raisedFrom=&raisedTo=&overdue= → { page, pageSize, total,
 * sort, dir, rows }. Unlike the page, a bad parameter is answered with 422 and the field it concerns.
 */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'deviation.read');
    return listDeviations(parseDeviationListQueryStrict(new URL(request.url).searchParams), user);
  });
}
