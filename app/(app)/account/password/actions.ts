'use server';

import { revalidatePath } from 'next/cache';
import type { PasswordFormState } from '@/components/account/password-form-state';
import { defineAction } from '@/lib/define-action';
import { changeOwnPassword } from '@/lib/users/commands';
import { changeOwnPasswordSchema } from '@/lib/validation/users';

/*
 * The one action a person may run while their password is still one an administrator set, hence
 * allowPasswordChange. Success re-renders the whole signed-in app, so the notice asking for a new
 * password goes away and every page opens again.
 */

const run = defineAction(changeOwnPasswordSchema, (input, user) => changeOwnPassword(user, input), {
  allowPasswordChange: true,
});

export async function changeOwnPasswordAction(_previous: PasswordFormState, formData: FormData): Promise<PasswordFormState> {
  const result = await run(formData);
  if (!result.ok) return { status: 'failed', message: result.message, fieldErrors: result.fieldErrors };
  revalidatePath('/', 'layout');
  return {
    status: 'saved',
    message: 'Your password is changed. Use the new one to sign in and to sign records.',
    fieldErrors: {},
  };
}
