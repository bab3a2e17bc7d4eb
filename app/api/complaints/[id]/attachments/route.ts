import { uploadAttachment } from '@/lib/attachments/commands';
import { respondEvidence } from '@/lib/attachments/http';
import { getAttachRefusal, listAttachments } from '@/lib/attachments/queries';
import { readUploadedFile } from '@/lib/attachments/upload-request';
import { requireUser } from '@/lib/auth/session';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { ForbiddenError } from '@/lib/errors';

/*
 * GET /api/complaints/:id/attachments → the evidence list (AttachmentDto[]) for whoever may read the
 * complaint. POST multipart/form-data with one field "file" → 201 and the stored AttachmentDto;
 * 413 too large, 415 not an accepted type, 503 storage down, 403 not allowed now, 404 not visible.
 */

export async function GET(_request: Request, { params }: RouteContext<'/api/complaints/[id]/attachments'>) {
  return respondEvidence(async () => {
    const user = await requireUser();
    return listAttachments('complaint', complaintIdFrom((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/complaints/[id]/attachments'>) {
  return respondEvidence(async () => {
    const user = await requireUser();
    const recordId = complaintIdFrom((await params).id);
    // Refuse before reading up to 25 MB of body; the command checks again under a lock.
    const refusal = await getAttachRefusal('complaint', recordId, user);
    if (refusal) throw new ForbiddenError(refusal);
    const file = await readUploadedFile(request);
    return uploadAttachment(user, { recordType: 'complaint', recordId, file });
  }, 201);
}
