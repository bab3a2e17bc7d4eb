import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import {
  ConflictError,
  ForbiddenError,
  InvalidTransitionError,
  NotFoundError,
  UnauthenticatedError,
  ValidationError,
} from '@/lib/errors';

/*
 * The edge between the web and a command. Only domain errors carry their message to people;
 * anything else is logged with a reference and shown generically (OWASP Error Handling Cheat
 * Sheet: do not leak internals in error responses). HTTP statuses follow RFC 9110 §15.5
 * (401, 403, 404, 409, 422).
 */

const user = { id: 5, email: 'operator@brackwater.example', name: 'Tova Lindqvist-Amaro', title: '', role: 'operator' as const };
const requireUser = vi.fn(async () => user);
vi.mock('@/lib/auth/session', () => ({ requireUser: () => requireUser() }));

const { defineAction, describeError, formDataToObject, respond } = await import('@/lib/define-action');

const schema = z.object({
  id: z.coerce.number().int().positive(),
  version: z.coerce.number().int().positive(),
  reason: z.string().trim().min(3, 'Give the reason.'),
  password: z.string().optional(),
});

function form(entries: Record<string, string>): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(entries)) f.append(k, v);
  f.append('$ACTION_ID_abc', '');
  return f;
}

let logged: unknown[][] = [];
beforeEach(() => {
  logged = [];
  vi.spyOn(console, 'error').mockImplementation((...args: unknown[]) => {
    logged.push(args);
  });
});
afterEach(() => vi.restoreAllMocks());

describe('defineAction', () => {
  it('coerces FormData strings, passes the signed-in user and returns the data', async () => {
    const run = defineAction(schema, async (input, who) => ({ input, who: who.id }));
    const result = await run(form({ id: '12', version: '3', reason: 'Dent found' }));
    expect(result).toEqual({ ok: true, data: { input: { id: 12, version: 3, reason: 'Dent found' }, who: 5 } });
  });

  it('returns field errors and the typed values, never the password, when the input is invalid', async () => {
    const command = vi.fn();
    const run = defineAction(schema, command);
    const result = await run(form({ id: '12', version: 'x', reason: 'no', password: 'secret pass' }));
    expect(command).not.toHaveBeenCalled();
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(Object.keys(result.fieldErrors).sort()).toEqual(['reason', 'version']);
    expect(result.fieldErrors.reason).toEqual(['Give the reason.']);
    expect(result.values).toEqual({ id: '12', version: 'x', reason: 'no' });
  });

  it.each([
    [new NotFoundError('This filling ring')],
    [new ForbiddenError('Your role does not allow this (ring: retire).')],
    [new ConflictError()],
    [new InvalidTransitionError('"Retire" is not possible while this filling ring is in service.')],
  ])('passes the message of a domain error through: %s', async (err) => {
    const run = defineAction(schema, async () => {
      throw err;
    });
    const result = await run({ id: 1, version: 1, reason: 'Dent found' });
    expect(result).toMatchObject({ ok: false, message: err.message, fieldErrors: {} });
    expect(logged).toEqual([]);
  });

  it('keeps the field errors of a ValidationError raised by the command', async () => {
    const run = defineAction(schema, async () => {
      throw new ValidationError('The password is not correct. Nothing was signed.', { password: ['The password is not correct.'] });
    });
    const result = await run({ id: 1, version: 1, reason: 'Dent found', password: 'wrong' });
    expect(result).toMatchObject({ ok: false, fieldErrors: { password: ['The password is not correct.'] } });
  });

  it('hides an unexpected error behind a reference that is also logged', async () => {
    const run = defineAction(schema, async () => {
      throw new Error("ER_NO_SUCH_TABLE: Table 'plumbline.filling_rings' doesn't exist");
    });
    const result = await run({ id: 1, version: 1, reason: 'Dent found' });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    const ref = /\(ref ([0-9A-F]{8})\)/.exec(result.message)?.[1];
    expect(result.message).toBe(`Something went wrong (ref ${ref}). Nothing was saved.`);
    expect(result.message).not.toMatch(/ER_NO_SUCH_TABLE/);
    expect(String(logged[0]?.[0])).toContain(ref!);
  });

  it('stops a signed-out visitor before the command runs', async () => {
    requireUser.mockRejectedValueOnce(new UnauthenticatedError());
    const command = vi.fn();
    const result = await defineAction(schema, command)({ id: 1, version: 1, reason: 'Dent found' });
    expect(command).not.toHaveBeenCalled();
    expect(result).toMatchObject({ ok: false, message: 'Your session has ended. Sign in again.' });
  });
});

describe('HTTP answers', () => {
  it.each([
    [new UnauthenticatedError(), 401],
    [new ForbiddenError('no'), 403],
    [new NotFoundError(), 404],
    [new ConflictError(), 409],
    [new InvalidTransitionError('no'), 409],
    [new ValidationError('no', { reason: ['Give the reason.'] }), 422],
    [new Error('boom'), 500],
  ])('maps %s to %i', async (err, status) => {
    expect(describeError(err).status).toBe(status);
    const response = await respond(async () => {
      throw err;
    });
    expect(response.status).toBe(status);
    const body = (await response.json()) as { message: string; fieldErrors: Record<string, string[]> };
    expect(body).toHaveProperty('message');
    expect(body).toHaveProperty('fieldErrors');
  });

  it('answers 200 with the data on success', async () => {
    const response = await respond(async () => ({ id: 1 }));
    expect(response.status).toBe(200);
    expect(await response.json()).toEqual({ id: 1 });
  });
});

describe('formDataToObject', () => {
  it('drops framework fields and gathers repeated names into a list', () => {
    const f = form({ reason: 'Dent' });
    f.append('batch', '1');
    f.append('batch', '2');
    expect(formDataToObject(f)).toEqual({ reason: 'Dent', batch: ['1', '2'] });
  });
});
