/*
 * What a ring action form gets back when its action fails: the message, errors per field and the
 * values that were typed (React resets a form after its action runs). Passwords are never echoed.
 * On success the action redirects instead, so there is no "saved" state here.
 */

export interface RingFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

export const idleRingFormState: RingFormState = { failed: false, message: null, fieldErrors: {}, values: {} };
