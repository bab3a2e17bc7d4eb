'use client';

import { useActionState, useId } from 'react';
import { SelectField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SignatureBlock } from '@/components/ui/signature-block';
import { SubmitButton } from '@/components/ui/submit-button';
import { idleRingFormState, type RingFormState } from './ring-form-state';

/*
 * One lifecycle action on a ring: the reason, the condition where the event records one, and, when
 * the event is signed, the signature block that shows the meaning before the password is entered
 * (21 CFR 11.50(a)(3), 11.200(a)). Errors sit next to their fields; typed values survive a failure.
 */

export interface RingEventFormProps {
  action: (previous: RingFormState, formData: FormData) => Promise<RingFormState>;
  ringId: number;
  version: number;
  event: string;
  heading: string;
  description: string;
  submitLabel: string;
  pendingLabel: string;
  danger?: boolean;
  /** Shown before the fields, e.g. a safety caution. */
  caution?: string;
  condition?: {
    label: string;
    options: readonly { value: string; label: string }[];
    defaultValue: string;
    required: boolean;
    hint?: string;
  };
  signature?: { meaningLabel: string; statement: string; signerName: string };
}

function TextAreaField({
  id,
  name,
  label,
  hint,
  errors,
  defaultValue,
}: {
  id: string;
  name: string;
  label: string;
  hint: string;
  errors: readonly string[] | undefined;
  defaultValue: string;
}) {
  const invalid = Boolean(errors && errors.length > 0);
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-semibold text-ink-900">
        {label}
        <span aria-hidden="true" className="ml-1 font-normal text-ink-600">
          (required)
        </span>
      </label>
      <p id={`${id}-hint`} className="text-sm text-ink-600">
        {hint}
      </p>
      <textarea
        id={id}
        name={name}
        required
        rows={3}
        maxLength={500}
        defaultValue={defaultValue}
        aria-invalid={invalid ? true : undefined}
        aria-describedby={invalid ? `${id}-hint ${id}-error` : `${id}-hint`}
        className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base text-ink-900 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
      />
      {invalid ? (
        <p id={`${id}-error`} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
          <span aria-hidden="true">✕</span>
          <span>{errors!.join(' ')}</span>
        </p>
      ) : null}
    </div>
  );
}

export function RingEventForm(props: RingEventFormProps) {
  const [state, formAction] = useActionState(props.action, idleRingFormState);
  const uid = useId();
  const headingId = `${uid}-heading`;
  const passwordErrors = state.fieldErrors.password;

  return (
    <section aria-labelledby={headingId} className="rounded-lg border border-ink-200 bg-white p-5">
      <h3 id={headingId} className="text-lg font-semibold">
        {props.heading}
      </h3>
      <p className="mt-1 text-ink-600">{props.description}</p>
      <form action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
        {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
        {props.caution ? (
          <Notice tone="warn" live={false}>
            {props.caution}
          </Notice>
        ) : null}
        <input type="hidden" name="id" value={props.ringId} />
        <input type="hidden" name="version" value={props.version} />
        <input type="hidden" name="event" value={props.event} />
        {props.condition ? (
          <SelectField
            id={`${uid}-condition`}
            name="condition"
            label={props.condition.label}
            hint={props.condition.hint}
            options={props.condition.options}
            required={props.condition.required}
            defaultValue={state.values.condition ?? props.condition.defaultValue}
            errors={state.fieldErrors.condition}
          />
        ) : null}
        <TextAreaField
          id={`${uid}-reason`}
          name="reason"
          label="Reason"
          hint="What was found or done. Recorded in the history and audit trail with your name and the time."
          errors={state.fieldErrors.reason}
          defaultValue={state.values.reason ?? ''}
        />
        {props.signature ? (
          <SignatureBlock
            id={uid}
            meaningLabel={props.signature.meaningLabel}
            statement={props.signature.statement}
            signerName={props.signature.signerName}
            errors={passwordErrors}
          />
        ) : null}
        <div>
          <SubmitButton pendingLabel={props.pendingLabel} variant={props.danger ? 'danger' : 'primary'}>
            {props.submitLabel}
          </SubmitButton>
        </div>
      </form>
    </section>
  );
}
