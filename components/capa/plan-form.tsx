'use client';

import { useActionState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import type { CapaPlanOptionsDto } from '@/lib/capa/detail';
import { type CapaFormState, idleCapaFormState } from './form-state';
import { OtherErrors, TextArea } from '@/components/ui/form-bits';

/*
 * The plan while the CAPA is being planned, by its owner: problem, root cause, due date and the effectiveness
 * criteria, written before any action is taken. The recurrence criterion is the part the product can
 * count for itself: a defect, where (machine or ring) and over how many batches or days.
 */

export interface PlanFormValues {
  title: string;
  problemStatement: string;
  rootCause: string;
  effectivenessCriteria: string;
  dueAt: string;
  criterionDefectId: string;
  criterionMachineId: string;
  criterionRingId: string;
  criterionBatches: string;
  criterionDays: string;
}

const shownFields = [
  'title',
  'problemStatement',
  'rootCause',
  'effectivenessCriteria',
  'dueAt',
  'criterionDefectId',
  'criterionMachineId',
  'criterionRingId',
  'criterionBatches',
  'criterionDays',
];

export function PlanForm({
  action,
  capaId,
  version,
  initial,
  options,
}: {
  action: (previous: CapaFormState, formData: FormData) => Promise<CapaFormState>;
  capaId: number;
  version: number;
  initial: PlanFormValues;
  options: CapaPlanOptionsDto;
}) {
  const [state, formAction] = useActionState(action, idleCapaFormState);
  const v = (k: keyof PlanFormValues) => (state.failed ? (state.values[k] ?? '') : initial[k]);
  const e = state.fieldErrors;
  const none = { value: '', label: '— none —' };
  return (
    <form action={formAction} className="flex flex-col gap-4" noValidate>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={capaId} />
      <input type="hidden" name="version" value={version} />
      <TextField name="title" label="Title" required maxLength={200} defaultValue={v('title')} errors={e.title} />
      <TextArea name="problemStatement" label="Problem statement" required rows={4} defaultValue={v('problemStatement')} errors={e.problemStatement} />
      <TextArea
        name="rootCause"
        label="Root cause"
        hint="Carried from the source record; refine it if the CAPA's own analysis says more."
        rows={3}
        defaultValue={v('rootCause')}
        errors={e.rootCause}
      />
      <TextField name="dueAt" label="Due" type="date" defaultValue={v('dueAt')} errors={e.dueAt} />
      <TextArea
        name="effectivenessCriteria"
        label="Effectiveness criteria"
        hint="What will be measured, over what period or number of batches, and what counts as success. Written now, before the actions."
        rows={3}
        defaultValue={v('effectivenessCriteria')}
        errors={e.effectivenessCriteria}
      />
      <fieldset className="flex flex-col gap-4 rounded-md border border-ink-200 p-4">
        <legend className="px-1 font-semibold">Recurrence the product counts</legend>
        <p className="text-sm text-ink-600">
          Optional. Deviations with this defect on this machine or ring are counted from the day the last action is completed.
        </p>
        <SelectField
          name="criterionDefectId"
          label="Defect"
          options={[none, ...options.defects.map((o) => ({ value: String(o.id), label: o.label }))]}
          defaultValue={v('criterionDefectId')}
          errors={e.criterionDefectId}
        />
        <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
          <SelectField
            name="criterionMachineId"
            label="Machine"
            options={[none, ...options.machines.map((o) => ({ value: String(o.id), label: o.label }))]}
            defaultValue={v('criterionMachineId')}
            errors={e.criterionMachineId}
          />
          <SelectField
            name="criterionRingId"
            label="Filling ring"
            options={[none, ...options.rings.map((o) => ({ value: String(o.id), label: o.label }))]}
            defaultValue={v('criterionRingId')}
            errors={e.criterionRingId}
          />
          <TextField name="criterionBatches" label="Over this many batches" type="number" min={1} max={1000} inputMode="numeric" defaultValue={v('criterionBatches')} errors={e.criterionBatches} />
          <TextField name="criterionDays" label="Over this many days" type="number" min={1} max={730} inputMode="numeric" defaultValue={v('criterionDays')} errors={e.criterionDays} />
        </div>
      </fieldset>
      <OtherErrors fieldErrors={e} shown={shownFields} />
      <div>
        <SubmitButton pendingLabel="Saving…">Save the plan</SubmitButton>
      </div>
    </form>
  );
}
