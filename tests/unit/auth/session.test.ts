import { beforeEach, describe, expect, it, vi } from 'vitest';
import { ForbiddenError, UnauthenticatedError } from '@/lib/errors';

/*
 * What a person may reach while their password is one an administrator set. 21 CFR 11.300(b) asks
 * that passwords be "periodically checked, recalled, or revised"; making the person replace an
 * administrator-chosen password before any other work is common practice, so that nobody else
 * knows the password that signs their records (21 CFR 11.100(a), 11.200(a)).
 */

interface Row {
  id: number;
  email: string;
  name: string;
  title: string;
  role: 'operator';
  active: boolean;
  mustChangePassword: boolean;
}

let sessionUserId: string | undefined;
let row: Row | undefined;

vi.mock('@/lib/auth/config', () => ({
  auth: async () => (sessionUserId ? { user: { id: sessionUserId, role: 'operator' } } : null),
}));
vi.mock('@/db/client', () => {
  const query = {
    from: () => query,
    where: () => query,
    limit: async () => (row ? [row] : []),
  };
  return { db: { select: () => query } };
});

class Redirected extends Error {
  constructor(readonly url: string) {
    super(`redirect ${url}`);
  }
}
class ForbiddenPage extends Error {}
vi.mock('next/navigation', () => ({
  redirect: (url: string) => {
    throw new Redirected(url);
  },
  forbidden: () => {
    throw new ForbiddenPage();
  },
}));

const { choosePasswordFirst, requirePageUser, requireUser, requireUserWith } = await import('@/lib/auth/session');

const person = (mustChangePassword: boolean): Row => ({
  id: 7,
  email: 'operator@brackwater.example',
  name: 'Tova Lindqvist-Amaro',
  title: 'Line operator',
  role: 'operator',
  active: true,
  mustChangePassword,
});

const redirectOf = (promise: Promise<unknown>) =>
  promise.then(
    () => null,
    (err: unknown) => (err instanceof Redirected ? err.url : Promise.reject(err)),
  );

beforeEach(() => {
  sessionUserId = '7';
  row = person(false);
});

describe('requireUser, for commands and route handlers', () => {
  it('answers with the account, including the flag, when the password is the person’s own', async () => {
    await expect(requireUser()).resolves.toEqual({
      id: 7,
      email: 'operator@brackwater.example',
      name: 'Tova Lindqvist-Amaro',
      title: 'Line operator',
      role: 'operator',
      mustChangePassword: false,
    });
  });

  it('refuses every command while the password is one an administrator set (21 CFR 11.300(b); common practice)', async () => {
    row = person(true);
    const err = await requireUser().catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ForbiddenError);
    expect((err as Error).message).toBe(choosePasswordFirst);
    await expect(requireUserWith('deviation.read')).rejects.toBeInstanceOf(ForbiddenError);
  });

  it('lets the change-password action through while the flag is set', async () => {
    row = person(true);
    await expect(requireUser({ allowPasswordChange: true })).resolves.toMatchObject({ id: 7, mustChangePassword: true });
  });

  it('still refuses a deactivated account, with or without the option (21 CFR 11.10(d))', async () => {
    row = { ...person(true), active: false };
    await expect(requireUser({ allowPasswordChange: true })).rejects.toBeInstanceOf(UnauthenticatedError);
    sessionUserId = undefined;
    await expect(requireUser()).rejects.toBeInstanceOf(UnauthenticatedError);
  });
});

describe('requirePageUser, for pages', () => {
  it('sends a person with an administrator-set password to the password page, keeping where they were going (common practice)', async () => {
    row = person(true);
    expect(await redirectOf(requirePageUser('deviation.read', { returnTo: '/deviations?status=open' }))).toBe(
      `/account/password?returnTo=${encodeURIComponent('/deviations?status=open')}`,
    );
    expect(await redirectOf(requirePageUser(undefined, { returnTo: '/' }))).toBe('/account/password');
  });

  it('sends them there before the role check, so no page’s forbidden notice hides the reason', async () => {
    row = person(true);
    expect(await redirectOf(requirePageUser('users.manage', { returnTo: '/admin' }))).toBe(
      `/account/password?returnTo=${encodeURIComponent('/admin')}`,
    );
  });

  it('opens the password page itself', async () => {
    row = person(true);
    await expect(requirePageUser(undefined, { returnTo: '/account/password', allowPasswordChange: true })).resolves.toMatchObject({
      mustChangePassword: true,
    });
  });

  it('opens every page again once the flag is cleared', async () => {
    row = person(false);
    await expect(requirePageUser('deviation.read', { returnTo: '/deviations' })).resolves.toMatchObject({ id: 7 });
  });

  it('never carries another site in the return address (OWASP Unvalidated Redirects and Forwards Cheat Sheet)', async () => {
    row = person(true);
    for (const returnTo of ['//evil.example/x', '/\\evil.example', 'https://evil.example']) {
      expect(await redirectOf(requirePageUser(undefined, { returnTo }))).toBe('/account/password');
    }
    sessionUserId = undefined;
    expect(await redirectOf(requirePageUser(undefined, { returnTo: '//evil.example' }))).toBe(
      `/sign-in?callbackUrl=${encodeURIComponent('/')}`,
    );
  });
});
