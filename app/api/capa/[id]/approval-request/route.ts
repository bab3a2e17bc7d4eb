import { requireUser } from '@/lib/auth/session';
import { requestPlanApproval } from '@/lib/capa/commands';
import { readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';

/*
 * POST /api/capa/:id/approval-request { version } → mails the QA approvers who may sign the plan (not
 * the owner); 422 with fieldErrors.actions / .effectivenessCriteria while the plan is incomplete.
 */

function idOf(raw: string): number {
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This CAPA');
  return Number(raw);
}

export async function POST(request: Request, { params }: RouteContext<'/api/capa/[id]/approval-request'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    return requestPlanApproval(user, { ...((await readJson(request)) as object), id } as Parameters<typeof requestPlanApproval>[1]);
  });
}
