import { requireUser } from '@/lib/auth/session';
import { updatePlan } from '@/lib/capa/commands';
import { getCapaDetail, sendCapaEvent } from '@/lib/capa/detail';
import { readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';

/*
 * GET /api/capa/:id → the detail DTO (record, source, actions of every round, recurrence evidence,
 * history, signatures, audit trail for audit readers, allowedEvents, canPlan).
 * POST { event, version, reason?, password? } → sends a lifecycle event through the same command the
 * page uses. PUT { version, title, problemStatement, rootCause?, effectivenessCriteria?,
 * dueAt?, criterionDefectId?, criterionMachineId?, criterionRingId?, criterionBatches?, criterionDays? }
 * → saves the plan. 401/403/404/409/422 as `respond` maps the domain errors.
 */

function idOf(raw: string): number {
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This CAPA');
  return Number(raw);
}

export async function GET(_request: Request, { params }: RouteContext<'/api/capa/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    return getCapaDetail(idOf((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/capa/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    return sendCapaEvent(user, id, await readJson(request));
  });
}

export async function PUT(request: Request, { params }: RouteContext<'/api/capa/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    const body = await readJson(request);
    return updatePlan(user, { ...(body as object), id } as Parameters<typeof updatePlan>[1]);
  });
}
