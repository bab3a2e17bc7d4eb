'use client';

import { useActionState } from 'react';
import { idleFormState, type AdminFormState } from '@/components/admin/form-state';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';

/*
 * Site calendar forms. Each keeps what was typed after a refused submit (React resets a form
 * after its action) and shows the error under the field it belongs to.
 */

type FormAction = (previous: AdminFormState, formData: FormData) => Promise<AdminFormState>;

function Outcome({ state }: { state: AdminFormState }) {
  if (state.status === 'failed' && state.message) return <Notice tone="danger" title={state.message} />;
  if (state.status === 'saved' && state.message) return <Notice tone="ok" title={state.message} />;
  return null;
}

export interface DueDaysValues {
  critical: number;
  major: number;
  minor: number;
}

export function DueDaysForm({ action, current }: { action: FormAction; current: DueDaysValues }) {
  const [state, formAction] = useActionState(action, idleFormState);
  // After a save the page re-renders with the new values; after a refusal the typed ones are shown.
  const v = state.status === 'failed' ? state.values : {};
  const e = state.fieldErrors;
  const days = (name: keyof DueDaysValues, label: string) => (
    <TextField
      key={`${name}-${state.submissions}`}
      name={name}
      label={label}
      inputMode="numeric"
      pattern="[0-9]*"
      defaultValue={v[name] ?? String(current[name])}
      errors={e[name]}
      required
      hint="Calendar days from the day the record is opened."
    />
  );
  return (
    <form action={formAction} className="flex flex-col gap-4" noValidate>
      <Outcome state={state} />
      <div className="grid grid-cols-1 gap-4 sm:grid-cols-3">
        {days('critical', 'Critical')}
        {days('major', 'Major')}
        {days('minor', 'Minor')}
      </div>
      <TextField
        key={`reason-${state.submissions}`}
        name="reason"
        label="Reason for the change"
        defaultValue={v.reason ?? ''}
        errors={e.reason}
        required
        hint="Goes into the audit trail with the old and new values."
      />
      <div>
        <SubmitButton pendingLabel="Saving…">Save targets</SubmitButton>
      </div>
    </form>
  );
}

export function AddClosureForm({ action, minDay }: { action: FormAction; minDay: string }) {
  const [state, formAction] = useActionState(action, idleFormState);
  const v = state.status === 'failed' ? state.values : {};
  const e = state.fieldErrors;
  return (
    <form action={formAction} className="flex flex-col gap-4" noValidate>
      <Outcome state={state} />
      <div className="grid grid-cols-1 gap-4 sm:grid-cols-[12rem_1fr]">
        <TextField
          key={`day-${state.submissions}`}
          name="day"
          label="Day"
          type="date"
          min={minDay}
          defaultValue={v.day ?? ''}
          errors={e.day}
          required
        />
        <TextField
          key={`description-${state.submissions}`}
          name="description"
          label="Description"
          defaultValue={v.description ?? ''}
          errors={e.description}
          required
          hint="Shown wherever a clock skips this day, e.g. “Plant shutdown”."
        />
      </div>
      <div>
        <SubmitButton pendingLabel="Adding…">Add closure</SubmitButton>
      </div>
    </form>
  );
}

export function DeactivateClosureForm({ action, day, label }: { action: FormAction; day: string; label: string }) {
  const [state, formAction] = useActionState(action, idleFormState);
  const v = state.status === 'failed' ? state.values : {};
  return (
    <details className="group">
      <summary className="inline-flex min-h-11 cursor-pointer items-center rounded-md border border-ink-400 bg-white px-3 font-semibold hover:bg-ink-100">
        Deactivate<span className="sr-only"> the closure on {label}</span>
      </summary>
      <form action={formAction} className="mt-2 flex flex-col gap-3" noValidate>
        <Outcome state={state} />
        <input type="hidden" name="day" value={day} />
        <TextField
          key={`reason-${day}-${state.submissions}`}
          id={`reason-${day}`}
          name="reason"
          label="Reason"
          defaultValue={v.reason ?? ''}
          errors={state.fieldErrors.reason}
          required
          hint="The closure stays on record, marked inactive."
        />
        <div>
          <SubmitButton pendingLabel="Deactivating…" variant="danger">
            Deactivate closure
          </SubmitButton>
        </div>
      </form>
    </details>
  );
}
