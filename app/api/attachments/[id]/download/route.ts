import { evidenceErrorResponse } from '@/lib/attachments/http';
import { parseId } from '@/lib/attachments/upload-request';
import { getDownloadLink } from '@/lib/attachments/queries';
import { requireUser } from '@/lib/auth/session';
import { NotFoundError } from '@/lib/errors';

/*
 * GET /api/attachments/:id/download → 302 to a presigned link valid five minutes, after checking that
 * the person may read the record the file belongs to; 404 otherwise. Nothing here may be cached:
 * a cached redirect would hand the link to whoever asks next.
 */

export async function GET(_request: Request, { params }: RouteContext<'/api/attachments/[id]/download'>) {
  try {
    const user = await requireUser();
    const id = parseId((await params).id);
    if (id === null) throw new NotFoundError('This file');
    const link = await getDownloadLink(id, user);
    return new Response(null, { status: 302, headers: { Location: link.url, 'Cache-Control': 'no-store' } });
  } catch (err) {
    return evidenceErrorResponse(err);
  }
}
