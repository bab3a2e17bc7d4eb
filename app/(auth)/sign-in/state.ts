import { lockMinutes, maxConsecutiveFailures } from '@/lib/auth/lockout';

export interface SignInState {
  /** What was typed, returned so the field keeps it after React resets the form. */
  email: string;
  error: string | null;
}

export const signInFailedMessage =
  `That e-mail and password did not work. After ${maxConsecutiveFailures} failed attempts an account ` +
  `is locked for ${lockMinutes} minutes.`;
