import { requireUser } from '@/lib/auth/session';
import { saveResponseDraft, sendResponse } from '@/lib/complaints/commands';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * PUT /api/complaints/:id/response { version, letter } saves the letter (HTML, cleaned on the server)
 * while the answer is to be sent (QA). POST { version, channel: email|post } sends the saved letter by
 * e-mail to the complainant's address through the outbox, or records it as sent by post; the letter
 * as sent is kept with the record. → { record, allowedEvents, signature: null }; 401/403/404/409/422.
 * The letter itself is read back only through GET /api/complaints/:id, by complaint.read_personal.
 */

export async function PUT(request: Request, { params }: RouteContext<'/api/complaints/[id]/response'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return saveResponseDraft(user, { ...(body as object), id } as Parameters<typeof saveResponseDraft>[1]);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/complaints/[id]/response'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return sendResponse(user, { ...(body as object), id } as Parameters<typeof sendResponse>[1]);
  });
}
