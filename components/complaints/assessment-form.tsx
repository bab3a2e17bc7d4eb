'use client';

import { useActionState, useId, useState } from 'react';
import { FieldError, OtherErrors, TextArea } from '@/components/ui/form-bits';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { reportDueOn } from '@/lib/complaints/deadline';
import { type RegulatoryClass, adverseEventDefinitions, reportKindFor, reportKindLabels } from '@/lib/complaints/labels';
import type { OptionDto } from '@/lib/complaints/queries';
import { type ComplaintFormAction, idleComplaintFormState } from './form-state';

/*
 * The assessment: category from the catalogue, the adverse-event questions with their definitions for
 * this product's class beside them, and the reportability decision with the deadline it would set,
 * computed here with the same clocks module the server uses (the server computes it again on save).
 */

export interface AssessmentFormProps {
  action: ComplaintFormAction;
  complaintId: number;
  version: number;
  regulatoryClass: RegulatoryClass;
  receivedOn: string;
  categories: { defects: OptionDto[]; other: OptionDto[] };
  initial: { category: string; adverseEvent: string; seriousAdverseEvent: string; reportable: string; assessmentRationale: string };
}

function YesNo({ name, legend, value, onChange, errors, hint }: { name: string; legend: string; value: string; onChange: (v: string) => void; errors?: string[]; hint?: string }) {
  const uid = useId();
  return (
    <fieldset className="flex flex-col gap-1" aria-describedby={[hint ? `${uid}-hint` : null, errors ? `${uid}-error` : null].filter(Boolean).join(' ') || undefined}>
      <legend className="font-semibold text-ink-900">{legend}</legend>
      {hint ? (
        <p id={`${uid}-hint`} className="max-w-prose text-sm text-ink-700">
          {hint}
        </p>
      ) : null}
      <div className="flex gap-6">
        {(['yes', 'no'] as const).map((o) => (
          <label key={o} className="inline-flex min-h-11 items-center gap-2">
            <input type="radio" name={name} value={o} checked={value === o} onChange={() => onChange(o)} className="h-5 w-5" />
            {o === 'yes' ? 'Yes' : 'No'}
          </label>
        ))}
      </div>
      <FieldError id={`${uid}-error`} errors={errors} />
    </fieldset>
  );
}

export function AssessmentForm(props: AssessmentFormProps) {
  const [state, formAction] = useActionState(props.action, idleComplaintFormState);
  const start = state.failed ? { ...props.initial, ...state.values } : props.initial;
  const [adverse, setAdverse] = useState(start.adverseEvent);
  const [serious, setSerious] = useState(start.seriousAdverseEvent);
  const [reportable, setReportable] = useState(start.reportable);
  const e = state.fieldErrors;
  const definitions = adverseEventDefinitions[props.regulatoryClass];
  const kind = reportKindFor[props.regulatoryClass];
  const due = reportDueOn(kind, props.receivedOn);
  return (
    <form action={formAction} noValidate className="flex flex-col gap-4" data-testid="assessment-form">
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={props.complaintId} />
      <input type="hidden" name="version" value={props.version} />
      <div className="flex flex-col gap-1">
        <label htmlFor="assessment-category" className="font-semibold text-ink-900">
          Category
        </label>
        <select
          id="assessment-category"
          name="category"
          defaultValue={start.category}
          aria-invalid={e.category ? true : undefined}
          aria-describedby={e.category ? 'assessment-category-error' : undefined}
          className="block min-h-11 w-full max-w-md rounded-md border border-ink-400 bg-white px-3 text-base"
        >
          <option value="">Pick a category</option>
          <optgroup label="Capsule defects">
            {props.categories.defects.map((c) => (
              <option key={c.value} value={c.value}>
                {c.label}
              </option>
            ))}
          </optgroup>
          <optgroup label="Other">
            {props.categories.other.map((c) => (
              <option key={c.value} value={c.value}>
                {c.label}
              </option>
            ))}
          </optgroup>
        </select>
        <FieldError id="assessment-category-error" errors={e.category} />
      </div>
      <YesNo name="adverseEvent" legend="Is it an adverse event?" hint={definitions.adverseEvent} value={adverse} onChange={setAdverse} errors={e.adverseEvent} />
      {adverse === 'yes' ? (
        <YesNo name="seriousAdverseEvent" legend="Is it serious?" hint={definitions.serious} value={serious} onChange={setSerious} errors={e.seriousAdverseEvent} />
      ) : null}
      <YesNo
        name="reportable"
        legend="Must it be reported to FDA?"
        hint={`For this product: ${reportKindLabels[kind]}. Counted from ${props.receivedOn}, the day we received it, the report would be due on ${due}.`}
        value={reportable}
        onChange={setReportable}
        errors={e.reportable}
      />
      {reportable === 'yes' ? <Notice tone="warn" title={`Report due ${due}`} live={false}>{reportKindLabels[kind]}. The countdown shows on the record and in the list, and the owner is reminded by e-mail.</Notice> : null}
      <TextArea
        name="assessmentRationale"
        label="Rationale"
        hint="Why these answers: what the facts show. Signed with the decision."
        required
        rows={4}
        maxLength={5000}
        defaultValue={start.assessmentRationale}
        errors={e.assessmentRationale}
      />
      <OtherErrors fieldErrors={e} shown={['category', 'adverseEvent', 'seriousAdverseEvent', 'reportable', 'assessmentRationale']} />
      <div>
        <SubmitButton pendingLabel="Saving…">Save the assessment</SubmitButton>
      </div>
    </form>
  );
}
