'use client';

import dynamic from 'next/dynamic';
import { useActionState, useId, useState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import type { OptionDto } from '@/lib/capa/detail';
import { capaActionCategoryLabels, capaActionKindLabels } from '@/lib/capa/labels';
import { type CapaFormState, idleCapaFormState } from './form-state';
import { FieldError, OtherErrors, TextArea } from '@/components/ui/form-bits';

/* Adds an action to the plan, or changes one not yet completed (with actionId). */

export interface ActionFormValues {
  kind: string;
  category: string;
  description: string;
  ownerId: string;
  dueAt: string;
}

export function ActionForm({
  action,
  capaId,
  version,
  actionId,
  initial,
  owners,
  submitLabel,
}: {
  action: (previous: CapaFormState, formData: FormData) => Promise<CapaFormState>;
  capaId: number;
  version: number;
  actionId?: number;
  initial: ActionFormValues;
  owners: OptionDto[];
  submitLabel: string;
}) {
  const [state, formAction] = useActionState(action, idleCapaFormState);
  const v = (k: keyof ActionFormValues) => (state.failed ? (state.values[k] ?? '') : initial[k]);
  const e = state.fieldErrors;
  const idSuffix = actionId ? `a${actionId}` : 'new';
  return (
    <form action={formAction} className="flex flex-col gap-4" noValidate>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={capaId} />
      <input type="hidden" name="version" value={version} />
      {actionId ? <input type="hidden" name="actionId" value={actionId} /> : null}
      <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
        <SelectField
          id={`kind-${idSuffix}`}
          name="kind"
          label="Corrective or preventive"
          required
          options={Object.entries(capaActionKindLabels).map(([value, label]) => ({ value, label }))}
          defaultValue={v('kind')}
          errors={e.kind}
        />
        <SelectField
          id={`category-${idSuffix}`}
          name="category"
          label="What it changes"
          required
          options={Object.entries(capaActionCategoryLabels).map(([value, label]) => ({ value, label }))}
          defaultValue={v('category')}
          errors={e.category}
        />
      </div>
      <TextArea name="description" label="Description" required rows={3} maxLength={5000} defaultValue={v('description')} errors={e.description} />
      <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
        <SelectField
          id={`owner-${idSuffix}`}
          name="ownerId"
          label="Owner"
          required
          options={[{ value: '', label: 'Pick a person' }, ...owners.map((o) => ({ value: String(o.id), label: o.label }))]}
          defaultValue={v('ownerId')}
          errors={e.ownerId}
        />
        <TextField id={`due-${idSuffix}`} name="dueAt" label="Due" type="date" required defaultValue={v('dueAt')} errors={e.dueAt} />
      </div>
      <OtherErrors fieldErrors={e} shown={['kind', 'category', 'description', 'ownerId', 'dueAt']} />
      <div>
        <SubmitButton pendingLabel="Saving…">{submitLabel}</SubmitButton>
      </div>
    </form>
  );
}

function EditorLoading() {
  return (
    <div aria-busy="true" className="min-h-48 rounded-md border border-ink-400 bg-ink-50 px-3 py-2 text-ink-600">
      Loading the editor…
    </div>
  );
}

const RichTextEditor = dynamic(() => import('@/components/rich-text/rich-text-editor').then((m) => m.RichTextEditor), {
  ssr: false,
  loading: EditorLoading,
});

/*
 * The action owner's "done" with the evidence as rich text (what was done, where the proof is, a
 * table of serials if needed). The HTML travels in the editor's hidden input; the server cleans it.
 * Files go to the CAPA's Evidence section.
 */
export function CompleteActionForm({
  action,
  capaId,
  actionId,
  actionVersion,
}: {
  action: (previous: CapaFormState, formData: FormData) => Promise<CapaFormState>;
  capaId: number;
  actionId: number;
  actionVersion: number;
}) {
  const [state, formAction] = useActionState(action, idleCapaFormState);
  const uid = useId();
  const [evidence, setEvidence] = useState('');
  const errors = state.fieldErrors.evidence;
  const describedBy = [`${uid}-hint`, errors ? `${uid}-error` : null].filter(Boolean).join(' ');
  return (
    <form action={formAction} className="flex flex-col gap-3" noValidate>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={capaId} />
      <input type="hidden" name="actionId" value={actionId} />
      <input type="hidden" name="actionVersion" value={actionVersion} />
      <div className="flex flex-col gap-1">
        <p className="flex flex-wrap items-baseline gap-x-1">
          <span id={`${uid}-label`} className="font-semibold text-ink-900">
            Evidence of completion
          </span>
          <span aria-hidden="true" className="text-ink-600">
            (required)
          </span>
        </p>
        <p id={`${uid}-hint`} className="text-sm text-ink-600">
          What was done and where the proof is (procedure revision, training record, work order, ring serial). Attach files in the Evidence section
          of this CAPA.
        </p>
        <RichTextEditor
          name="evidence"
          labelledBy={`${uid}-label`}
          describedBy={describedBy}
          initialHtml={state.values.evidence ?? evidence}
          invalid={Boolean(errors)}
          onChange={setEvidence}
        />
        <FieldError id={`${uid}-error`} errors={errors} />
      </div>
      <OtherErrors fieldErrors={state.fieldErrors} shown={['evidence']} />
      <div>
        <SubmitButton pendingLabel="Recording…">Record as completed</SubmitButton>
      </div>
    </form>
  );
}

export function RequestApprovalForm({
  action,
  capaId,
  version,
}: {
  action: (previous: CapaFormState, formData: FormData) => Promise<CapaFormState>;
  capaId: number;
  version: number;
}) {
  const [state, formAction] = useActionState(action, idleCapaFormState);
  return (
    <form action={formAction} className="flex flex-col gap-3" noValidate>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={capaId} />
      <input type="hidden" name="version" value={version} />
      <div>
        <SubmitButton pendingLabel="Asking…" variant="secondary">
          Ask QA approvers to approve the plan
        </SubmitButton>
      </div>
    </form>
  );
}
