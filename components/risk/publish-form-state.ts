/* What the publish-scales form action hands back: the outcome, errors per field and the typed values. */

export interface PublishScalesFormState {
  status: 'idle' | 'failed';
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

export const idlePublishScalesState: PublishScalesFormState = { status: 'idle', message: null, fieldErrors: {}, values: {} };
