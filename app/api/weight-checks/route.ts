import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { parseInput, readJson, respond } from '@/lib/define-action';
import { NotFoundError, ValidationError } from '@/lib/errors';
import { recordWeightCheckSchema } from '@/lib/validation/weight';
import { recordWeightCheck } from '@/lib/weight-checks/commands';
import { getWeightBatch, getWeightBatchByLot, listBatchWeightChecks } from '@/lib/weight-checks/queries';

/**
 * GET /api/weight-checks?lot=BW-2026-1120-A (or ?batchId=) → { batch, checks }: the batch with its
 * product, machine and ring, and its checks oldest first (the newest 100).
 */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'weight_check.read');
    const params = new URL(request.url).searchParams;
    const lot = params.get('lot');
    const id = Number(params.get('batchId'));
    if (!lot && !(Number.isInteger(id) && id > 0)) throw new ValidationError('Give ?lot= or ?batchId=.');
    const batch = lot ? await getWeightBatchByLot(lot) : await getWeightBatch(id);
    if (!batch) throw new NotFoundError('The batch');
    return { batch, checks: await listBatchWeightChecks(batch.id) };
  });
}

/**
 * POST /api/weight-checks { batchId, method, massMode, shellMassMg?, masses: number[] | text, note? }
 * → 201 { check, evaluation }.
 */
export async function POST(request: Request) {
  return respond(async () => {
    const input = parseInput(recordWeightCheckSchema, await readJson(request));
    const user = await requireUser();
    return recordWeightCheck(user, input);
  }, 201);
}
