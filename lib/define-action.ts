import 'server-only';
import { randomBytes } from 'node:crypto';
import { z } from 'zod';
import { type CurrentUser, type PasswordChangeOption, requireUser } from './auth/session';
import { parseInput } from './validation/parse';
import {
  ConflictError,
  ServiceUnavailableError,
  ForbiddenError,
  InvalidTransitionError,
  NotFoundError,
  UnauthenticatedError,
  ValidationError,
  isDomainError,
} from './errors';

export { parseInput };

/*
 * The edge between the web and a command. Server actions and route handlers both parse their
 * input with the command's zod schema, ask who is signing in (requireUser re-reads the account),
 * run the command, and turn what comes back into one shape. Only domain errors reach people as
 * they are; anything else is logged under a short reference and reported as a generic failure.
 */

export type ActionResult<T> =
  | { ok: true; data: T }
  | {
      ok: false;
      message: string;
      fieldErrors: Record<string, string[]>;
      /** What was submitted (never passwords), so a form can show it again after React resets it. */
      values?: Record<string, string>;
    };

export interface DescribedError {
  status: number;
  message: string;
  fieldErrors: Record<string, string[]>;
}

/** A short reference a person can read out to support, matching the server log line. */
function newReference(): string {
  return randomBytes(4).toString('hex').toUpperCase();
}

export function describeError(err: unknown): DescribedError {
  if (isDomainError(err)) {
    const fieldErrors = err instanceof ValidationError ? err.fieldErrors : {};
    let status = 400;
    if (err instanceof UnauthenticatedError) status = 401;
    else if (err instanceof ForbiddenError) status = 403;
    else if (err instanceof NotFoundError) status = 404;
    else if (err instanceof ConflictError || err instanceof InvalidTransitionError) status = 409;
    else if (err instanceof ValidationError) status = 422;
    else if (err instanceof ServiceUnavailableError) status = 503;
    return { status, message: err.message, fieldErrors };
  }
  const ref = newReference();
  console.error(`[ref ${ref}]`, err);
  return { status: 500, message: `Something went wrong (ref ${ref}). Nothing was saved.`, fieldErrors: {} };
}

/** FormData as a plain object of strings; repeated names become arrays; Next's own fields are dropped. */
export function formDataToObject(form: FormData): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const [key, value] of form.entries()) {
    if (key.startsWith('$ACTION') || typeof value !== 'string') continue;
    const prev = out[key];
    out[key] = prev === undefined ? value : Array.isArray(prev) ? [...prev, value] : [prev, value];
  }
  return out;
}

function echoValues(raw: unknown): Record<string, string> | undefined {
  if (!raw || typeof raw !== 'object') return undefined;
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(raw)) {
    if (/password/i.test(k)) continue;
    if (typeof v === 'string') out[k] = v;
    else if (typeof v === 'number' || typeof v === 'boolean') out[k] = String(v);
  }
  return out;
}

/**
 * Wraps a command for a server action: `const run = defineAction(schema, (input, user) => cmd(user, input))`;
 * `run(formData)` resolves to an ActionResult and never throws. `options` goes to requireUser: only
 * the change-password action passes `allowPasswordChange`.
 */
export function defineAction<S extends z.ZodType, T>(
  schema: S,
  command: (input: z.output<S>, user: CurrentUser) => Promise<T>,
  options: PasswordChangeOption = {},
): (input: FormData | Record<string, unknown>) => Promise<ActionResult<T>> {
  return async (input) => {
    const raw = input instanceof FormData ? formDataToObject(input) : input;
    try {
      const parsed = parseInput(schema, raw);
      const user = await requireUser(options);
      return { ok: true, data: await command(parsed, user) };
    } catch (err) {
      const { message, fieldErrors } = describeError(err);
      return { ok: false, message, fieldErrors, values: echoValues(raw) };
    }
  };
}

/** For route handlers: runs the work and answers JSON, with the status each domain error maps to. */
export async function respond(work: () => Promise<unknown>, successStatus = 200): Promise<Response> {
  try {
    return Response.json(await work(), { status: successStatus });
  } catch (err) {
    const { status, message, fieldErrors } = describeError(err);
    return Response.json({ message, fieldErrors }, { status });
  }
}

/** A request body as JSON, or a ValidationError a client can act on. */
export async function readJson(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    throw new ValidationError('The request body must be JSON.');
  }
}
