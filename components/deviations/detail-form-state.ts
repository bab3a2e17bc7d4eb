/*
 * What a deviation form gets back when its action fails: the message, errors per field and the
 * values that were typed (React resets a form after its action runs). Passwords are never echoed.
 * On success the action redirects to the page with a note instead.
 */

export interface DeviationFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

export const idleDeviationFormState: DeviationFormState = { failed: false, message: null, fieldErrors: {}, values: {} };
