'use client';

import { useActionState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { idleFormState, type AdminFormState } from './form-state';

export interface RoleOption {
  value: string;
  label: string;
}

export function CreateUserForm({
  action,
  roleOptions,
  passwordMinLength,
}: {
  action: (previous: AdminFormState, formData: FormData) => Promise<AdminFormState>;
  roleOptions: readonly RoleOption[];
  passwordMinLength: number;
}) {
  const [state, formAction] = useActionState(action, idleFormState);
  const v = state.values;
  const e = state.fieldErrors;
  return (
    <form action={formAction} className="flex max-w-xl flex-col gap-5" noValidate>
      {state.status === 'failed' && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <TextField name="name" label="Full name" autoComplete="off" defaultValue={v.name ?? ''} errors={e.name} required
        hint="As it should be printed with the person's electronic signatures." />
      <TextField name="email" label="E-mail" type="email" autoComplete="off" autoCapitalize="none" spellCheck={false}
        defaultValue={v.email ?? ''} errors={e.email} required hint="Used to sign in and for notifications." />
      <TextField name="title" label="Job title" autoComplete="off" defaultValue={v.title ?? ''} errors={e.title}
        hint="Printed under the name on signatures, e.g. “Line supervisor”." />
      <SelectField key={`role-${state.submissions}`} name="role" label="Role" options={[{ value: '', label: 'Choose a role' }, ...roleOptions]}
        defaultValue={v.role ?? ''} errors={e.role} required />
      <TextField name="password" label="Temporary password" type="password" autoComplete="new-password"
        minLength={passwordMinLength} errors={e.password} required
        hint={`At least ${passwordMinLength} characters. Give it to the person in person, never by e-mail.`} />
      <div>
        <SubmitButton pendingLabel="Creating…">Create user</SubmitButton>
      </div>
    </form>
  );
}
