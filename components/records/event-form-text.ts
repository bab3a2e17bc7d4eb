import type { TransitionRules } from '@/lib/records/workflow';
import { signatureMeaningLabels, signatureMeaningStatements } from '@/lib/signatures/meanings';
import type { RecordEventFormProps } from './record-event-form';

/*
 * What a record page writes for each of its events (heading, button, the reason's label), and the
 * event form's props from it and from what the transition asks of the person now: a reason field
 * when a reason is required, the signature block with the meaning when it is signed.
 */

export type EventFormText = Pick<RecordEventFormProps, 'heading' | 'description' | 'submitLabel' | 'pendingLabel' | 'danger'> & {
  reasonLabel?: string;
  reasonHint?: string;
};

export function eventFormProps(
  text: EventFormText,
  rules: TransitionRules,
  signerName: string,
): Pick<RecordEventFormProps, 'heading' | 'description' | 'submitLabel' | 'pendingLabel' | 'danger' | 'reason' | 'signature'> {
  return {
    heading: text.heading,
    description: text.description,
    submitLabel: text.submitLabel,
    pendingLabel: text.pendingLabel,
    danger: text.danger,
    reason: rules.reasonRequired ? { label: text.reasonLabel ?? 'Reason', hint: text.reasonHint ?? 'Recorded with your name and the time.' } : undefined,
    signature: rules.signature
      ? { meaningLabel: signatureMeaningLabels[rules.signature], statement: signatureMeaningStatements[rules.signature], signerName }
      : undefined,
  };
}
