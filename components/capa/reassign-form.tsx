'use client';

import { useActionState } from 'react';
import { SelectField } from '@/components/ui/field';
import { OtherErrors, TextArea } from '@/components/ui/form-bits';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import type { OptionDto } from '@/lib/capa/detail';
import { type CapaFormState, idleCapaFormState } from './form-state';

/*
 * Hands the CAPA to another QA investigator. Its own step, apart from the plan, so that only the
 * owner writes the plan and a change of owner is decided (by a QA approver or the owner) and
 * explained on its own (the reason is recorded in the audit trail).
 */

export function ReassignOwnerForm({
  action,
  capaId,
  version,
  currentOwnerId,
  owners,
}: {
  action: (previous: CapaFormState, formData: FormData) => Promise<CapaFormState>;
  capaId: number;
  version: number;
  currentOwnerId: number;
  owners: OptionDto[];
}) {
  const [state, formAction] = useActionState(action, idleCapaFormState);
  const e = state.fieldErrors;
  const candidates = owners.filter((o) => o.id !== currentOwnerId);
  return (
    <form action={formAction} className="flex flex-col gap-4" noValidate>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={capaId} />
      <input type="hidden" name="version" value={version} />
      <SelectField
        name="ownerId"
        label="New owner"
        required
        options={[{ value: '', label: '— pick a QA investigator —' }, ...candidates.map((o) => ({ value: String(o.id), label: o.label }))]}
        defaultValue={state.failed ? (state.values.ownerId ?? '') : ''}
        errors={e.ownerId}
      />
      <TextArea
        name="reason"
        label="Reason"
        hint="Why the CAPA changes hands. Recorded in the audit trail; the new owner is told by e-mail."
        required
        rows={2}
        maxLength={2000}
        defaultValue={state.failed ? (state.values.reason ?? '') : ''}
        errors={e.reason}
      />
      <OtherErrors fieldErrors={e} shown={['ownerId', 'reason']} />
      <div>
        <SubmitButton pendingLabel="Reassigning…">Reassign the owner</SubmitButton>
      </div>
    </form>
  );
}
