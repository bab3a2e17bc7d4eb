import 'server-only';
import { requireUser } from '../auth/session';
import { describeError } from '../define-action';
import { NotFoundError } from '../errors';
import { type EvidenceRecordType, missingNoun } from '../record-kinds';
import { assertMayAttach, uploadAttachment } from './commands';
import { listAttachments } from './queries';
import { evidenceStatus, parseId, readUploadedFile } from './upload-request';

/* Route handler answers for evidence: JSON, never cached, with the upload statuses on top of the usual ones. */

export function evidenceErrorResponse(err: unknown): Response {
  const { status, message, fieldErrors } = describeError(err);
  return Response.json({ message, fieldErrors }, { status: evidenceStatus(err) ?? status, headers: { 'Cache-Control': 'no-store' } });
}

export async function respondEvidence(work: () => Promise<unknown>, successStatus = 200): Promise<Response> {
  try {
    return Response.json(await work(), { status: successStatus, headers: { 'Cache-Control': 'no-store' } });
  } catch (err) {
    return evidenceErrorResponse(err);
  }
}

/**
 * GET and POST of /api/<records>/:id/attachments, the same for every record type with evidence:
 * GET → the evidence list (AttachmentDto[]) for whoever may see the record; POST multipart/form-data
 * with one field "file" → 201 and the stored AttachmentDto; 404 not visible, 403 not theirs to add,
 * 409 the record's state takes no more evidence, 413 too large, 415 not an accepted type, 422 no
 * usable file in the body, 503 storage down.
 */
export function evidenceRoutes(recordType: EvidenceRecordType) {
  const recordIdOf = async (params: Promise<{ id: string }>) => {
    const id = parseId((await params).id);
    if (id === null) throw new NotFoundError(missingNoun(recordType));
    return id;
  };
  return {
    async GET(_request: Request, { params }: { params: Promise<{ id: string }> }) {
      return respondEvidence(async () => {
        const user = await requireUser();
        return listAttachments(recordType, await recordIdOf(params), user);
      });
    },
    async POST(request: Request, { params }: { params: Promise<{ id: string }> }) {
      return respondEvidence(async () => {
        const user = await requireUser();
        const recordId = await recordIdOf(params);
        // Refuse before reading up to 25 MB of body; the command checks again under the record's lock.
        await assertMayAttach(user, recordType, recordId);
        const file = await readUploadedFile(request);
        return uploadAttachment(user, { recordType, recordId, file });
      }, 201);
    },
  };
}
