import { requireUser } from '@/lib/auth/session';
import { getComplaintDetail, sendComplaintEvent } from '@/lib/complaints/detail';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * GET /api/complaints/:id → the detail DTO (record, product, batch, category, report countdown, links,
 * the batch's deviations, history, signatures, audit trail for audit readers, allowedEvents). `personal`
 * (name, contact, harm, letter) is null unless the caller holds complaint.read_personal, and the audit
 * trail then shows those fields as hidden.
 * POST { event, version, reason?, password? } → sends a lifecycle event (start_assessment,
 * complete_assessment, skip_investigation, complete_investigation, close, reopen_assessment,
 * reopen_investigation) through the same command the page uses → { record, allowedEvents, signature }.
 */

export async function GET(_request: Request, { params }: RouteContext<'/api/complaints/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    return getComplaintDetail(complaintIdFrom((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/complaints/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    return sendComplaintEvent(user, id, await readJson(request));
  });
}
