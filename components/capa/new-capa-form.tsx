'use client';

import { useActionState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { TextArea } from '@/components/ui/form-bits';
import { type CapaFormState, idleCapaFormState } from './form-state';

/*
 * Opening a CAPA by hand: from a trend QA has seen, or from a deviation or complaint named by its
 * number. (A deviation's investigation opens its CAPA by itself.) Typed values come back after an error.
 */

export function NewCapaForm({
  action,
  owners,
}: {
  action: (previous: CapaFormState, formData: FormData) => Promise<CapaFormState>;
  owners: readonly { id: number; label: string }[];
}) {
  const [state, formAction] = useActionState(action, idleCapaFormState);
  const v = state.values;
  const e = state.fieldErrors;
  return (
    <form action={formAction} className="flex max-w-2xl flex-col gap-5" noValidate>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <TextField name="title" label="Title" defaultValue={v.title ?? ''} errors={e.title} required maxLength={200}
        hint="What the CAPA sets out to stop, in a line, e.g. “Broken bodies after ring changes on Filler 2”." />
      {/* Remounted with the typed value: a form reset would otherwise put back the first render's choice. */}
      <SelectField key={`source-${v.sourceType ?? 'trend'}`} name="sourceType" label="Raised from" required defaultValue={v.sourceType ?? 'trend'} errors={e.sourceType}
        options={[
          { value: 'trend', label: 'A trend (no single record)' },
          { value: 'deviation', label: 'A deviation' },
          { value: 'complaint', label: 'A complaint' },
        ]} />
      <TextField name="sourceNumber" label="Number of the deviation or complaint" defaultValue={v.sourceNumber ?? ''}
        errors={e.sourceNumber ?? e.sourceId} autoCapitalize="characters" spellCheck={false}
        hint="e.g. DEV-2026-0012 or CMP-2026-0004. Leave empty for a trend." />
      <TextArea name="problemStatement" label="Problem statement" required rows={5} maxLength={10_000}
        defaultValue={v.problemStatement} errors={e.problemStatement}
        hint="What was seen, where and how often: the facts the trend or record shows." />
      <TextArea name="rootCause" label="Root cause (if known)" rows={3} maxLength={10_000} defaultValue={v.rootCause} errors={e.rootCause}
        hint="A deviation's root cause is carried over when this is left empty." />
      <SelectField key={`owner-${v.ownerId ?? ''}`} name="ownerId" label="Owner" required defaultValue={v.ownerId ?? ''} errors={e.ownerId}
        options={[{ value: '', label: 'Choose the QA investigator who will plan it' }, ...owners.map((o) => ({ value: String(o.id), label: o.label }))]} />
      <TextField name="dueAt" label="Due date (optional)" type="date" defaultValue={v.dueAt ?? ''} errors={e.dueAt} />
      <div>
        <SubmitButton pendingLabel="Opening…">Open the CAPA</SubmitButton>
      </div>
    </form>
  );
}
