'use client';

import { useActionState, useId } from 'react';
import { Notice } from '@/components/ui/notice';
import { SignatureBlock } from '@/components/ui/signature-block';
import { SubmitButton } from '@/components/ui/submit-button';
import { type DeviationFormState, idleDeviationFormState } from './detail-form-state';

/*
 * One lifecycle action on a deviation: the reason when the transition asks for one and, when it is
 * signed, the signature block that shows the printed name and meaning before the password is
 * entered (21 CFR 11.50(a), 11.200(a)). Errors sit next to their fields; typed values survive a failure.
 */

export interface DeviationEventFormProps {
  action: (previous: DeviationFormState, formData: FormData) => Promise<DeviationFormState>;
  deviationId: number;
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

function FieldError({ id, errors }: { id: string; errors: readonly string[] | undefined }) {
  if (!errors || errors.length === 0) return null;
  return (
    <p id={id} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
      <span aria-hidden="true">✕</span>
      <span>{errors.join(' ')}</span>
    </p>
  );
}

export function DeviationEventForm(props: DeviationEventFormProps) {
  const [state, formAction] = useActionState(props.action, idleDeviationFormState);
  const uid = useId();
  const headingId = `${uid}-heading`;
  const reasonErrors = state.fieldErrors.reason;
  const passwordErrors = state.fieldErrors.password;
  const reasonInvalid = Boolean(reasonErrors?.length);

  return (
    <section aria-labelledby={headingId} className="rounded-lg border border-ink-200 bg-white p-5">
      <h3 id={headingId} className="text-lg font-semibold">
        {props.heading}
      </h3>
      <p className="mt-1 text-ink-600">{props.description}</p>
      <form action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
        {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
        <input type="hidden" name="id" value={props.deviationId} />
        <input type="hidden" name="version" value={props.version} />
        <input type="hidden" name="event" value={props.event} />
        {props.reason ? (
          <div className="flex flex-col gap-1">
            <label htmlFor={`${uid}-reason`} className="font-semibold text-ink-900">
              {props.reason.label}
              <span aria-hidden="true" className="ml-1 font-normal text-ink-600">
                (required)
              </span>
            </label>
            <p id={`${uid}-reason-hint`} className="text-sm text-ink-600">
              {props.reason.hint}
            </p>
            <textarea
              id={`${uid}-reason`}
              name="reason"
              required
              rows={3}
              maxLength={2000}
              defaultValue={state.values.reason ?? ''}
              aria-invalid={reasonInvalid ? true : undefined}
              aria-describedby={reasonInvalid ? `${uid}-reason-hint ${uid}-reason-error` : `${uid}-reason-hint`}
              className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base text-ink-900 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
            />
            <FieldError id={`${uid}-reason-error`} errors={reasonErrors} />
          </div>
        ) : null}
        {props.signature ? (
          <SignatureBlock
            id={uid}
            meaningLabel={props.signature.meaningLabel}
            statement={props.signature.statement}
            signerName={props.signature.signerName}
            errors={passwordErrors}
          />
        ) : null}
        {/* Errors about fields this form does not show (e.g. a batch without disposition) still reach the person. */}
        {Object.entries(state.fieldErrors)
          .filter(([k]) => k !== 'reason' && k !== 'password')
          .map(([k, errors]) => (
            <FieldError key={k} id={`${uid}-${k}-error`} errors={errors} />
          ))}
        <div>
          <SubmitButton pendingLabel={props.pendingLabel} variant={props.danger ? 'danger' : 'primary'}>
            {props.submitLabel}
          </SubmitButton>
        </div>
      </form>
    </section>
  );
}
