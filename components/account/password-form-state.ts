/*
 * What the change-password action hands back. No values are echoed: every field is a password, and
 * React clearing the form after a submit is what should happen to them.
 */

export interface PasswordFormState {
  status: 'idle' | 'saved' | 'failed';
  message: string | null;
  fieldErrors: Record<string, string[]>;
}

export const idlePasswordFormState: PasswordFormState = { status: 'idle', message: null, fieldErrors: {} };
