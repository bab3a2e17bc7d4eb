/*
 * What a CAPA form gets back when its action fails: the message, errors per field and the values that
 * were typed (React resets a form after its action runs). Passwords are never echoed. On success the
 * action redirects to the page with a note instead.
 */

export interface CapaFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

export const idleCapaFormState: CapaFormState = { failed: false, message: null, fieldErrors: {}, values: {} };
