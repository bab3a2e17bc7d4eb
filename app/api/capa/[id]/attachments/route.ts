import { uploadAttachment } from '@/lib/attachments/commands';
import { respondEvidence } from '@/lib/attachments/http';
import { getAttachRefusal, listAttachments } from '@/lib/attachments/queries';
import { parseId, readUploadedFile } from '@/lib/attachments/upload-request';
import { requireUser } from '@/lib/auth/session';
import { ForbiddenError, NotFoundError } from '@/lib/errors';

/*
 * GET /api/capa/:id/attachments → the CAPA's evidence files (AttachmentDto[]) for whoever may read
 * CAPAs. POST multipart/form-data with one field "file" → 201 and the stored AttachmentDto; 413 too
 * large, 415 not an accepted type, 503 storage down, 403 not allowed now (who may add evidence:
 * lib/attachments/record-access.ts), 404 not visible, 422 no usable file in the body.
 */

function capaId(raw: string): number {
  const id = parseId(raw);
  if (id === null) throw new NotFoundError('This CAPA');
  return id;
}

export async function GET(_request: Request, { params }: RouteContext<'/api/capa/[id]/attachments'>) {
  return respondEvidence(async () => {
    const user = await requireUser();
    return listAttachments('capa', capaId((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/capa/[id]/attachments'>) {
  return respondEvidence(async () => {
    const user = await requireUser();
    const recordId = capaId((await params).id);
    // Refuse before reading up to 25 MB of body; the command checks again under a lock.
    const refusal = await getAttachRefusal('capa', recordId, user);
    if (refusal) throw new ForbiddenError(refusal);
    const file = await readUploadedFile(request);
    return uploadAttachment(user, { recordType: 'capa', recordId, file });
  }, 201);
}
