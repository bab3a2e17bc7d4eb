/*
 * What the investigation form gets back when a save fails. Everything typed lives in the form's own
 * state (React resets a form after its action, but not its state), so nothing is echoed here;
 * `conflict` says someone else saved first and the form offers the person's text to copy.
 */
export interface InvestigationFormState {
  failed: boolean;
  conflict: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
}

export const idleInvestigationFormState: InvestigationFormState = { failed: false, conflict: false, message: null, fieldErrors: {} };
