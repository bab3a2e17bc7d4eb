import { Readable } from 'node:stream';
import { evidenceErrorResponse } from '@/lib/attachments/http';
import { parseId } from '@/lib/attachments/upload-request';
import { openPreview } from '@/lib/attachments/queries';
import { requireUser } from '@/lib/auth/session';
import { NotFoundError } from '@/lib/errors';

/*
 * GET /api/attachments/:id/preview → the image itself (JPEG, PNG, WebP) for an <img> on the record's
 * page, after the same read check as a download; 404 for other types or other people's records.
 * Kept out of every shared cache.
 */

export async function GET(_request: Request, { params }: RouteContext<'/api/attachments/[id]/preview'>) {
  try {
    const user = await requireUser();
    const id = parseId((await params).id);
    if (id === null) throw new NotFoundError('This file');
    const preview = await openPreview(id, user);
    return new Response(Readable.toWeb(preview.stream) as ReadableStream<Uint8Array>, {
      status: 200,
      headers: {
        'Content-Type': preview.contentType,
        'Content-Length': String(preview.sizeBytes),
        'Content-Disposition': `inline; filename*=UTF-8''${encodeURIComponent(preview.fileName)}`,
        'Cache-Control': 'private, no-store',
        'Content-Security-Policy': "default-src 'none'; sandbox",
      },
    });
  } catch (err) {
    return evidenceErrorResponse(err);
  }
}
