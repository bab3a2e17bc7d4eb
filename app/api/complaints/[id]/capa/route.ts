import { requireUser } from '@/lib/auth/session';
import { raiseCapaFromComplaint } from '@/lib/complaints/commands';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * POST /api/complaints/:id/capa { version, title, problemStatement, ownerId } raises a CAPA from the
 * complaint (QA investigator with capa.create, while under investigation), linked back to it
 * → 201 { record, allowedEvents, signature: null, capa: { id, number } }; 401/403/404/409/422.
 */

export async function POST(request: Request, { params }: RouteContext<'/api/complaints/[id]/capa'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return raiseCapaFromComplaint(user, { ...(body as object), id } as Parameters<typeof raiseCapaFromComplaint>[1]);
  }, 201);
}
