'use client';

import Link from 'next/link';
import { useActionState, useId } from 'react';
import { Notice } from '@/components/ui/notice';
import { SignatureBlock } from '@/components/ui/signature-block';
import { SubmitButton } from '@/components/ui/submit-button';
import { OtherErrors, TextArea } from '@/components/ui/form-bits';

/*
 * The two decisions an effectiveness review link offers: "effective", and "not effective, because …".
 * Each is an electronic signature: the printed name, the meaning and its statement are shown before
 * the password (21 CFR 11.50(a), 11.200(a)). Both forms share one answer, so an error shows on the
 * form that was sent, with the typed reason kept; a signed decision replaces both forms.
 */

export type ReviewDecision = 'effective' | 'not_effective';

export interface ReviewFormState {
  failed: boolean;
  message: string | null;
  fieldErrors: Record<string, string[]>;
  /** What was typed (never the password), so the form shows it again after React resets it. */
  values: Record<string, string>;
  signed: { decision: ReviewDecision; capaId: number; number: string } | null;
}

const idle: ReviewFormState = { failed: false, message: null, fieldErrors: {}, values: {}, signed: null };

export interface ReviewDecisionFormsProps {
  action: (previous: ReviewFormState, formData: FormData) => Promise<ReviewFormState>;
  token: string;
  signerName: string;
  effective: { meaningLabel: string; statement: string };
  notEffective: { meaningLabel: string; statement: string };
}

export function ReviewDecisionForms(props: ReviewDecisionFormsProps) {
  const [state, formAction] = useActionState(props.action, idle);
  const uid = useId();

  if (state.signed) {
    const { decision, capaId, number } = state.signed;
    return (
      <div data-testid="review-outcome" className="flex flex-col gap-3">
        <Notice
          tone="ok"
          title={
            decision === 'effective'
              ? `Signed as effective. ${number} is closed.`
              : `Signed as not effective. ${number} is back in planning for new actions.`
          }
        >
          Your signature is recorded with your name, the date and time and its meaning. This link is now used and cannot sign again.
        </Notice>
        <p>
          <Link href={`/capa/${capaId}`} className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
            Open {number}
          </Link>
        </p>
      </div>
    );
  }

  const sent = state.values.decision as ReviewDecision | undefined;
  const errorsFor = (decision: ReviewDecision) => (state.failed && sent === decision ? state.fieldErrors : {});

  return (
    <div className="grid grid-cols-1 items-start gap-4 lg:grid-cols-2">
      <section aria-labelledby={`${uid}-effective`} className="rounded-lg border border-ink-200 bg-white p-5">
        <h3 id={`${uid}-effective`} className="text-lg font-semibold">
          Effective
        </h3>
        <p className="mt-1 text-ink-600">The evidence meets the criteria written in the plan. Signing closes the CAPA.</p>
        <form action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
          {state.failed && sent === 'effective' && state.message ? <Notice tone="danger" title={state.message} /> : null}
          <input type="hidden" name="token" value={props.token} />
          <input type="hidden" name="decision" value="effective" />
          <SignatureBlock
            id={`${uid}-sig-effective`}
            meaningLabel={props.effective.meaningLabel}
            statement={props.effective.statement}
            signerName={props.signerName}
            errors={errorsFor('effective').password}
          />
          <OtherErrors fieldErrors={errorsFor('effective')} shown={['password', 'token', 'decision']} />
          <div>
            <SubmitButton pendingLabel="Signing…">Sign as effective</SubmitButton>
          </div>
        </form>
      </section>

      <section aria-labelledby={`${uid}-not-effective`} className="rounded-lg border border-ink-200 bg-white p-5">
        <h3 id={`${uid}-not-effective`} className="text-lg font-semibold">
          Not effective, because …
        </h3>
        <p className="mt-1 text-ink-600">
          The criteria were not met. The CAPA goes back to planning for new actions; the earlier ones stay on record.
        </p>
        <form action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
          {state.failed && sent === 'not_effective' && state.message ? <Notice tone="danger" title={state.message} /> : null}
          <input type="hidden" name="token" value={props.token} />
          <input type="hidden" name="decision" value="not_effective" />
          <TextArea
            name="reason"
            label="Because…"
            hint="What the evidence shows and why the actions did not work. Recorded with your signature."
            required
            rows={3}
            maxLength={2000}
            defaultValue={sent === 'not_effective' ? (state.values.reason ?? '') : ''}
            errors={errorsFor('not_effective').reason}
          />
          <SignatureBlock
            id={`${uid}-sig-not-effective`}
            meaningLabel={props.notEffective.meaningLabel}
            statement={props.notEffective.statement}
            signerName={props.signerName}
            errors={errorsFor('not_effective').password}
          />
          <OtherErrors fieldErrors={errorsFor('not_effective')} shown={['password', 'reason', 'token', 'decision']} />
          <div>
            <SubmitButton pendingLabel="Signing…" variant="danger">
              Sign as not effective
            </SubmitButton>
          </div>
        </form>
      </section>
    </div>
  );
}
