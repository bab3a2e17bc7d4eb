import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { getDeviationDetail, sendDeviationEvent } from '@/lib/deviations/detail';
import { NotFoundError } from '@/lib/errors';

/*
 * GET /api/deviations/:id → the detail DTO (record, held batches, history, signatures, audit trail
 * for audit readers, allowedEvents). POST { event, version, reason?, password? } → sends the event
 * through the same command the page uses; 401/403/404/409/422 as `respond` maps the domain errors.
 */

function idOf(raw: string): number {
  // Anything but a plain positive integer names no deviation.
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This deviation');
  return Number(raw);
}

export async function GET(_request: Request, { params }: RouteContext<'/api/deviations/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    return getDeviationDetail(idOf((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/deviations/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    return sendDeviationEvent(user, id, await readJson(request));
  });
}
