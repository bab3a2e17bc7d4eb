import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { createDraft } from '@/lib/deviations/commands';
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

/**
 * POST /api/deviations { title, whatHappened, occurredAt, batchId?, machineId?, ringId?, defectId?,
 * affectedCount?, sampleDescription?, immediateActions?, lineStopped?, capsulesSegregated?,
 * heldBatchIds? } → 201 { record, allowedEvents }: a draft of the caller's, numbered when submitted
 * (event "submit" on POST /api/deviations/:id).
 */
export async function POST(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    return createDraft(user, (await readJson(request)) as Parameters<typeof createDraft>[1]);
  }, 201);
}
