import 'server-only';
import { describeError } from '../define-action';
import { evidenceStatus } from './upload-request';

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
