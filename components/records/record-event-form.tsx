'use client';

import { useActionState, useId } from 'react';
import { OtherErrors, TextArea } from '@/components/ui/form-bits';
import { Notice } from '@/components/ui/notice';
import { SignatureBlock } from '@/components/ui/signature-block';
import { SubmitButton } from '@/components/ui/submit-button';

/*
 * One lifecycle action on a record (deviation, CAPA, complaint): the reason when the transition asks
 * for one and, when it is signed, the signature block with the printed name and meaning before the
 * password (21 CFR 11.50(a), 11.200(a)). Errors sit beside their fields, errors about fields this form
 * does not show still reach the person, and a typed reason survives a failure.
 */

export interface RecordFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  values: Record<string, string>;
}

const idle: RecordFormState = { failed: false, message: null, fieldErrors: {}, values: {} };

export interface RecordEventFormProps {
  action: (previous: RecordFormState, formData: FormData) => Promise<RecordFormState>;
  recordId: number;
  version: number;
  event: string;
  heading: string;
  description: string;
  submitLabel: string;
  pendingLabel: string;
  danger?: boolean;
  reason?: { label: string; hint: string };
  signature?: { meaningLabel: string; statement: string; signerName: string };
}

export function RecordEventForm(props: RecordEventFormProps) {
  const [state, formAction] = useActionState(props.action, idle);
  const uid = useId();
  return (
    <section aria-labelledby={`${uid}-heading`} className="rounded-lg border border-ink-200 bg-white p-5" data-testid={`event-${props.event}`}>
      <h3 id={`${uid}-heading`} className="text-lg font-semibold">
        {props.heading}
      </h3>
      <p className="mt-1 text-ink-600">{props.description}</p>
      <form action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
        {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
        <input type="hidden" name="id" value={props.recordId} />
        <input type="hidden" name="version" value={props.version} />
        <input type="hidden" name="event" value={props.event} />
        {props.reason ? (
          <TextArea
            name="reason"
            label={props.reason.label}
            hint={props.reason.hint}
            required
            rows={3}
            maxLength={2000}
            defaultValue={state.values.reason ?? ''}
            errors={state.fieldErrors.reason}
          />
        ) : null}
        {props.signature ? (
          <SignatureBlock
            id={uid}
            meaningLabel={props.signature.meaningLabel}
            statement={props.signature.statement}
            signerName={props.signature.signerName}
            errors={state.fieldErrors.password}
          />
        ) : null}
        <OtherErrors fieldErrors={state.fieldErrors} shown={['reason', 'password']} />
        <div>
          <SubmitButton pendingLabel={props.pendingLabel} variant={props.danger ? 'danger' : 'primary'}>
            {props.submitLabel}
          </SubmitButton>
        </div>
      </form>
    </section>
  );
}
