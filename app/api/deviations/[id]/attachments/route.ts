import { uploadAttachment } from '@/lib/attachments/commands';
import { respondEvidence } from '@/lib/attachments/http';
import { parseId, readUploadedFile } from '@/lib/attachments/upload-request';
import { getAttachRefusal, listAttachments } from '@/lib/attachments/queries';
import { requireUser } from '@/lib/auth/session';
import { ForbiddenError, NotFoundError } from '@/lib/errors';

/*
 * GET /api/deviations/:id/attachments → the evidence list (AttachmentDto[]) for whoever may read the
 * deviation. POST multipart/form-data with one field "file" → 201 and the stored AttachmentDto;
 * 413 too large, 415 not an accepted type, 503 storage down, 403 not allowed now, 404 not visible.
 */

function deviationId(raw: string): number {
  const id = parseId(raw);
  if (id === null) throw new NotFoundError('This deviation');
  return id;
}

export async function GET(_request: Request, { params }: RouteContext<'/api/deviations/[id]/attachments'>) {
  return respondEvidence(async () => {
    const user = await requireUser();
    return listAttachments('deviation', deviationId((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/deviations/[id]/attachments'>) {
  return respondEvidence(async () => {
    const user = await requireUser();
    const recordId = deviationId((await params).id);
    // Refuse before reading up to 25 MB of body; the command checks again under a lock.
    const refusal = await getAttachRefusal('deviation', recordId, user);
    if (refusal) throw new ForbiddenError(refusal);
    const file = await readUploadedFile(request);
    return uploadAttachment(user, { recordType: 'deviation', recordId, file });
  }, 201);
}
