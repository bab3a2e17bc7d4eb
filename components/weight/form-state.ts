/*
 * What the record-check action gives back when it fails: the message, errors per field and the
 * typed values (React resets a form after its action runs). Success redirects instead.
 */

export interface WeightFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

export const idleWeightFormState: WeightFormState = { failed: false, message: null, fieldErrors: {}, values: {} };
