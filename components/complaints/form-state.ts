/*
 * What a complaint form gets back when its action fails: the message, errors per field and the values
 * that were typed (React resets a form after its action runs). Passwords are never echoed. On success
 * the action redirects to the page with a note instead.
 */

export interface ComplaintFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

export const idleComplaintFormState: ComplaintFormState = { failed: false, message: null, fieldErrors: {}, values: {} };

export type ComplaintFormAction = (previous: ComplaintFormState, formData: FormData) => Promise<ComplaintFormState>;
