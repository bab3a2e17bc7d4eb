/*
 * What a user-administration form action hands back: the outcome, errors per field, and the values
 * that were typed so the form can show them again (React resets a form after its action runs).
 * Passwords are never sent back.
 */

export interface AdminFormState {
  status: 'idle' | 'saved' | 'failed';
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
  /**
   * Counts submissions. A <select> ignores a changed defaultValue and React's form reset puts it
   * back to its first option, so selects are keyed on this to remount with the value to show.
   */
  submissions: number;
}

export const idleFormState: AdminFormState = { status: 'idle', message: null, fieldErrors: {}, values: {}, submissions: 0 };
