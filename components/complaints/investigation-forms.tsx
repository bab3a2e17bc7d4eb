'use client';

import { useActionState, useId } from 'react';
import { FieldError, OtherErrors, TextArea } from '@/components/ui/form-bits';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { type ComplaintFormAction, idleComplaintFormState } from './form-state';

/* The investigator's forms: retained samples and summary, a link to a deviation or CAPA, a new CAPA. */

function useForm(action: ComplaintFormAction) {
  return useActionState(action, idleComplaintFormState);
}

export function InvestigationForm({
  action,
  complaintId,
  version,
  initial,
}: {
  action: ComplaintFormAction;
  complaintId: number;
  version: number;
  initial: { retainedSamplesChecked: string; retainedSamplesNote: string; investigationSummary: string };
}) {
  const [state, formAction] = useForm(action);
  const v = state.failed ? { ...initial, ...state.values } : initial;
  const uid = useId();
  return (
    <form action={formAction} noValidate className="flex flex-col gap-4" data-testid="investigation-form">
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={complaintId} />
      <input type="hidden" name="version" value={version} />
      <fieldset className="flex flex-col gap-1">
        <legend className="font-semibold text-ink-900">Retained samples of the lot checked?</legend>
        <div className="flex gap-6">
          {(['yes', 'no'] as const).map((o) => (
            <label key={o} className="inline-flex min-h-11 items-center gap-2">
              <input type="radio" name="retainedSamplesChecked" value={o} defaultChecked={v.retainedSamplesChecked === o} className="h-5 w-5" />
              {o === 'yes' ? 'Yes' : 'No'}
            </label>
          ))}
        </div>
        <FieldError id={`${uid}-rs`} errors={state.fieldErrors.retainedSamplesChecked} />
      </fieldset>
      <TextArea
        name="retainedSamplesNote"
        label="What the retained samples showed"
        hint="How many were looked at and what was found, or why none were checked."
        rows={3}
        maxLength={5000}
        defaultValue={v.retainedSamplesNote}
        errors={state.fieldErrors.retainedSamplesNote}
      />
      <TextArea
        name="investigationSummary"
        label="Summary of the investigation"
        hint="What was found, the cause if known, and what is being done. The answer to the complainant quotes it."
        rows={5}
        maxLength={10000}
        defaultValue={v.investigationSummary}
        errors={state.fieldErrors.investigationSummary}
      />
      <OtherErrors fieldErrors={state.fieldErrors} shown={['retainedSamplesChecked', 'retainedSamplesNote', 'investigationSummary']} />
      <div>
        <SubmitButton pendingLabel="Saving…">Save the investigation</SubmitButton>
      </div>
    </form>
  );
}

export function LinkForm({ action, complaintId, version, target }: { action: ComplaintFormAction; complaintId: number; version: number; target: 'deviation' | 'capa' }) {
  const [state, formAction] = useForm(action);
  const noun = target === 'deviation' ? 'deviation' : 'CAPA';
  return (
    <form action={formAction} noValidate className="flex flex-wrap items-end gap-3" data-testid={`link-${target}`}>
      <input type="hidden" name="id" value={complaintId} />
      <input type="hidden" name="version" value={version} />
      <input type="hidden" name="target" value={target} />
      <div className="min-w-56 flex-1">
        <TextField
          id={`link-${target}-reference`}
          name="reference"
          label={`Link an existing ${noun}`}
          hint={target === 'deviation' ? 'Its number, e.g. DEV-2026-0042.' : 'Its number, e.g. CAPA-2026-0007.'}
          autoComplete="off"
          defaultValue={state.values.reference ?? ''}
          errors={state.fieldErrors.reference ?? (state.failed && !state.fieldErrors.reference && state.message ? [state.message] : undefined)}
        />
      </div>
      <SubmitButton pendingLabel="Linking…" variant="secondary">
        Link
      </SubmitButton>
    </form>
  );
}

export function RaiseCapaForm({
  action,
  complaintId,
  version,
  owners,
  initial,
}: {
  action: ComplaintFormAction;
  complaintId: number;
  version: number;
  owners: { id: number; label: string }[];
  initial: { title: string; problemStatement: string; ownerId: string };
}) {
  const [state, formAction] = useForm(action);
  const v = state.failed ? { ...initial, ...state.values } : initial;
  return (
    <form action={formAction} noValidate className="flex flex-col gap-4" data-testid="raise-capa">
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={complaintId} />
      <input type="hidden" name="version" value={version} />
      <TextField id="raise-capa-title" name="title" label="CAPA title" required defaultValue={v.title} errors={state.fieldErrors.title} />
      <TextArea name="problemStatement" label="Problem statement" required rows={4} maxLength={10000} defaultValue={v.problemStatement} errors={state.fieldErrors.problemStatement} />
      <SelectField
        id="raise-capa-owner"
        name="ownerId"
        label="Owner"
        options={[{ value: '', label: 'Pick a QA investigator' }, ...owners.map((o) => ({ value: String(o.id), label: o.label }))]}
        defaultValue={v.ownerId}
        errors={state.fieldErrors.ownerId}
      />
      <div>
        <SubmitButton pendingLabel="Raising…" variant="secondary">
          Raise the CAPA
        </SubmitButton>
      </div>
    </form>
  );
}

export function ReportSubmittedForm({ action, complaintId, version, today }: { action: ComplaintFormAction; complaintId: number; version: number; today: string }) {
  const [state, formAction] = useForm(action);
  return (
    <form action={formAction} noValidate className="flex flex-wrap items-end gap-3" data-testid="report-submitted">
      <input type="hidden" name="id" value={complaintId} />
      <input type="hidden" name="version" value={version} />
      <TextField
        id="report-submitted-on"
        name="submittedOn"
        type="date"
        max={today}
        label="Report submitted to FDA on"
        defaultValue={state.values.submittedOn ?? today}
        errors={state.fieldErrors.submittedOn ?? (state.failed && state.message ? [state.message] : undefined)}
      />
      <SubmitButton pendingLabel="Saving…" variant="secondary">
        Record the submission
      </SubmitButton>
    </form>
  );
}
