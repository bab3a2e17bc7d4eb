import { describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { ForbiddenError } from '@/lib/errors';

/*
 * A person whose password an administrator set may run one action only, the one that changes it
 * (21 CFR 11.300(b); replacing an administrator-set password first is common practice). The edge
 * hands the action's allowance to requireUser; every other action asks without it.
 */

const user = { id: 5, email: 'operator@brackwater.example', name: 'Tova Lindqvist-Amaro', title: '', role: 'operator' as const };
const requireUser = vi.fn(async (options: { allowPasswordChange?: true } = {}) => {
  if (!options.allowPasswordChange) throw new ForbiddenError('Choose your own password first (Change password, next to your name).');
  return { ...user, mustChangePassword: true };
});
vi.mock('@/lib/auth/session', () => ({ requireUser: (options?: { allowPasswordChange?: true }) => requireUser(options) }));

const { defineAction } = await import('@/lib/define-action');

const schema = z.object({ note: z.string() });

describe('defineAction and the password-change allowance', () => {
  it('refuses an ordinary action while the password must be changed, and runs nothing', async () => {
    const command = vi.fn(async () => 'ran');
    const result = await defineAction(schema, command)({ note: 'x' });
    expect(result).toMatchObject({ ok: false, message: 'Choose your own password first (Change password, next to your name).' });
    expect(command).not.toHaveBeenCalled();
  });

  it('runs the action that declares it changes the password', async () => {
    const result = await defineAction(schema, async (_input, who) => who.id, { allowPasswordChange: true })({ note: 'x' });
    expect(result).toEqual({ ok: true, data: 5 });
  });
});
