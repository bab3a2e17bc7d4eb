import { requireUser } from '@/lib/auth/session';
import { reassignOwner } from '@/lib/capa/commands';
import { readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';

/*
 * POST /api/capa/:id/owner { version, ownerId, reason } → hands the CAPA to another QA investigator
 * (capa.reassign: a QA approver, or the owner). 401/403/404/409/422 as `respond` maps the domain errors.
 */

export async function POST(request: Request, { params }: RouteContext<'/api/capa/[id]/owner'>) {
  return respond(async () => {
    const user = await requireUser();
    const raw = (await params).id;
    if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This CAPA');
    const body = await readJson(request);
    return reassignOwner(user, { ...(body as object), id: Number(raw) } as Parameters<typeof reassignOwner>[1]);
  });
}
