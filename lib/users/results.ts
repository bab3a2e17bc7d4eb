import 'server-only';
import { randomUUID } from 'node:crypto';
import {
  ConflictError,
  ForbiddenError,
  NotFoundError,
  UnauthenticatedError,
  ValidationError,
  isDomainError,
} from '../errors';

/*
 * Turning outcomes into what users see, for the user-administration actions and API routes.
 * Only domain errors carry their message out; anything else is logged with a reference the user can
 * quote. Kept local until the shared lib/define-action.ts lands, with the same result shape.
 */

export type ActionResult<T> =
  | { ok: true; data: T }
  | { ok: false; message: string; fieldErrors?: Record<string, string[]> };

function unexpected(err: unknown): { message: string } {
  const reference = randomUUID().slice(0, 8);
  console.error(`[${reference}]`, err);
  return { message: `Something went wrong and nothing was saved. Quote reference ${reference} if you report it.` };
}

export async function runAction<T>(fn: () => Promise<T>): Promise<ActionResult<T>> {
  try {
    return { ok: true, data: await fn() };
  } catch (err) {
    if (err instanceof ValidationError) return { ok: false, message: err.message, fieldErrors: err.fieldErrors };
    if (isDomainError(err)) return { ok: false, message: err.message };
    return { ok: false, ...unexpected(err) };
  }
}

const statusFor = (err: unknown): number => {
  if (err instanceof UnauthenticatedError) return 401;
  if (err instanceof ForbiddenError) return 403;
  if (err instanceof NotFoundError) return 404;
  if (err instanceof ConflictError) return 409;
  if (err instanceof ValidationError) return 422;
  if (isDomainError(err)) return 409;
  return 500;
};

/** A JSON error body `{ message, fieldErrors }` with the status that fits the error. */
export function errorResponse(err: unknown): Response {
  const status = statusFor(err);
  const body =
    status === 500
      ? { ...unexpected(err), fieldErrors: {} }
      : { message: (err as Error).message, fieldErrors: err instanceof ValidationError ? err.fieldErrors : {} };
  return Response.json(body, { status, headers: { 'Cache-Control': 'no-store' } });
}

/** Reads a JSON request body; a body that is not JSON is a 422, not a 500. */
export async function readJson(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    throw new ValidationError('The request body must be JSON.');
  }
}

/** A positive integer id from a URL segment, or NotFoundError. */
export function parseId(raw: string, what: string): number {
  const id = Number(raw);
  if (!/^\d+$/.test(raw) || !Number.isSafeInteger(id) || id <= 0) throw new NotFoundError(what);
  return id;
}
