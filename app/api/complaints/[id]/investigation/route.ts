import { requireUser } from '@/lib/auth/session';
import { saveInvestigation } from '@/lib/complaints/commands';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * PUT /api/complaints/:id/investigation { version, retainedSamplesChecked?: yes|no, retainedSamplesNote?,
 * investigationSummary? } records the investigation (QA investigator, while under investigation).
 * → { record, allowedEvents, signature: null } (record without personal data); 401/403/404/409/422.
 */

export async function PUT(request: Request, { params }: RouteContext<'/api/complaints/[id]/investigation'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return saveInvestigation(user, { ...(body as object), id } as Parameters<typeof saveInvestigation>[1]);
  });
}
