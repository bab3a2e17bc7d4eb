'use server';

import { AuthError } from 'next-auth';
import { signIn } from '@/lib/auth/config';
import { safeReturnPath } from '@/lib/navigation';
import { signInFailedMessage, type SignInState } from './state';

/*
 * Every failure gets the same message, whatever the cause (unknown e-mail, wrong password, locked,
 * deactivated), so the form never tells anyone whether an account exists.
 */
export async function signInAction(_previous: SignInState, formData: FormData): Promise<SignInState> {
  const email = String(formData.get('email') ?? '').slice(0, 254);
  const password = String(formData.get('password') ?? '');
  const redirectTo = safeReturnPath(formData.get('callbackUrl'));
  try {
    // On success this throws Next's redirect, which must propagate.
    await signIn('credentials', { email, password, redirectTo });
  } catch (err) {
    if (err instanceof AuthError) return { email, error: signInFailedMessage };
    throw err;
  }
  return { email, error: signInFailedMessage };
}
