import 'server-only';
import { ServiceUnavailableError, ValidationError } from '../errors';
import { FileTooLargeError, FileTypeRefusedError } from './errors';
import { maxAttachmentBytes, multipartOverheadBytes } from './limits';

/*
 * The HTTP edge of evidence uploads. The body is counted as it arrives and the upload is stopped as
 * soon as it passes the limit, so a 2 GB file is never held in memory; a declared Content-Length
 * over the limit is refused before a byte is read.
 */

const fileFieldError = (message: string) => new ValidationError(message, { file: [message] });

export async function readUploadedFile(request: Request): Promise<{ name: string; bytes: Buffer }> {
  const limit = maxAttachmentBytes + multipartOverheadBytes;
  const declared = Number(request.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > limit) throw new FileTooLargeError(null);
  const contentType = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\s*;/i.test(contentType) || !request.body) {
    throw fileFieldError('Send the file as multipart/form-data, in a field called "file".');
  }

  let received = 0;
  const counted = request.body.pipeThrough(
    new TransformStream<Uint8Array, Uint8Array>({
      transform(chunk, controller) {
        received += chunk.byteLength;
        if (received > limit) controller.error(new FileTooLargeError(null));
        else controller.enqueue(chunk);
      },
    }),
  );
  let form: FormData;
  try {
    form = await new Response(counted, { headers: { 'content-type': contentType } }).formData();
  } catch {
    if (received > limit) throw new FileTooLargeError(null);
    throw fileFieldError('The upload arrived incomplete. Try again.');
  }
  const files = form.getAll('file').filter((v): v is File => typeof v !== 'string');
  if (files.length === 0) throw fileFieldError('Choose a file to attach.');
  if (files.length > 1) throw fileFieldError('Send one file per upload.');
  const file = files[0]!;
  if (file.size > maxAttachmentBytes) throw new FileTooLargeError(file.size);
  return { name: file.name, bytes: Buffer.from(await file.arrayBuffer()) };
}

/** 413 too large, 415 wrong type (RFC 9110 §15.5.14, §15.5.16), 503 storage down; null: as any other domain error. */
export function evidenceStatus(err: unknown): number | null {
  if (err instanceof FileTooLargeError) return 413;
  if (err instanceof FileTypeRefusedError) return 415;
  if (err instanceof ServiceUnavailableError) return 503;
  return null;
}

/** A path segment that is not a plain positive integer names nothing. */
export function parseId(raw: string): number | null {
  return /^\d{1,9}$/.test(raw) && Number(raw) >= 1 ? Number(raw) : null;
}
