'use client';

import { useActionState, type ReactNode } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import type { ButtonVariant } from '@/components/ui/button';
import type { RoleOption } from './create-user-form';
import { idleFormState, type AdminFormState } from './form-state';

/*
 * The changes an administrator can make to an account, one small form each. Every form carries the
 * version the page was rendered from, so a change made meanwhile by someone else is refused rather
 * than silently overwritten.
 */

type FormAction = (previous: AdminFormState, formData: FormData) => Promise<AdminFormState>;

function ChangeForm({
  action,
  version,
  heading,
  description,
  submitLabel,
  pendingLabel,
  variant = 'secondary',
  children,
}: {
  action: FormAction;
  version: number;
  heading: string;
  description?: ReactNode;
  submitLabel: string;
  pendingLabel: string;
  variant?: ButtonVariant;
  children: (state: AdminFormState) => ReactNode;
}) {
  const [state, formAction] = useActionState(action, idleFormState);
  const headingId = `${heading.toLowerCase().replace(/[^a-z]+/g, '-')}-heading`;
  return (
    <section aria-labelledby={headingId} className="rounded-lg border border-ink-200 bg-white p-5">
      <h2 id={headingId} className="text-lg font-semibold">
        {heading}
      </h2>
      {description ? <div className="mt-1 text-ink-600">{description}</div> : null}
      <form action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
        {state.message ? (
          <Notice tone={state.status === 'saved' ? 'ok' : 'danger'} title={state.message} />
        ) : null}
        <input type="hidden" name="version" value={version} />
        {children(state)}
        <div>
          <SubmitButton pendingLabel={pendingLabel} variant={variant}>
            {submitLabel}
          </SubmitButton>
        </div>
      </form>
    </section>
  );
}

function ReasonField({ state, required, idPrefix }: { state: AdminFormState; required: boolean; idPrefix: string }) {
  return (
    <TextField
      id={`${idPrefix}-reason`}
      name="reason"
      label="Reason"
      autoComplete="off"
      defaultValue={state.status === 'failed' ? (state.values.reason ?? '') : ''}
      errors={state.fieldErrors.reason}
      required={required}
      hint="Recorded in the audit trail with your name and the time."
    />
  );
}

export function ChangeRoleForm({
  action,
  version,
  currentRole,
  roleOptions,
  isSelf,
}: {
  action: FormAction;
  version: number;
  currentRole: string;
  roleOptions: readonly RoleOption[];
  isSelf: boolean;
}) {
  return (
    <ChangeForm
      action={action}
      version={version}
      heading="Role"
      description={
        isSelf
          ? 'This is your own account: giving yourself another role removes your access to administration.'
          : 'The role decides what the person may see and do. It takes effect on their next page.'
      }
      submitLabel="Change role"
      pendingLabel="Changing…"
    >
      {(state) => (
        <>
          <SelectField
            key={`role-${state.submissions}-${currentRole}`}
            id="role-select"
            name="role"
            label="New role"
            options={roleOptions}
            defaultValue={state.status === 'failed' ? (state.values.role ?? currentRole) : currentRole}
            errors={state.fieldErrors.role}
            required
          />
          <ReasonField state={state} required idPrefix="role" />
        </>
      )}
    </ChangeForm>
  );
}

export function ActiveForm({ action, version, active }: { action: FormAction; version: number; active: boolean }) {
  return (
    <ChangeForm
      action={action}
      version={version}
      heading={active ? 'Deactivate' : 'Reactivate'}
      description={
        active
          ? 'A deactivated person can no longer sign in. Their records, audit entries and signatures stay as they are; accounts are never deleted.'
          : 'The person can sign in again with their current password.'
      }
      submitLabel={active ? 'Deactivate account' : 'Reactivate account'}
      pendingLabel={active ? 'Deactivating…' : 'Reactivating…'}
      variant={active ? 'danger' : 'secondary'}
    >
      {(state) => <ReasonField state={state} required idPrefix="active" />}
    </ChangeForm>
  );
}

export function ResetPasswordForm({
  action,
  version,
  passwordMinLength,
}: {
  action: FormAction;
  version: number;
  passwordMinLength: number;
}) {
  return (
    <ChangeForm
      action={action}
      version={version}
      heading="Reset password"
      description="Set a temporary password and give it to the person in person. The audit trail records that it was reset, never the password."
      submitLabel="Reset password"
      pendingLabel="Resetting…"
    >
      {(state) => (
        <>
          <TextField
            id="reset-password"
            name="password"
            label="Temporary password"
            type="password"
            autoComplete="new-password"
            minLength={passwordMinLength}
            errors={state.fieldErrors.password}
            required
            hint={`At least ${passwordMinLength} characters.`}
          />
          <ReasonField state={state} required={false} idPrefix="reset" />
        </>
      )}
    </ChangeForm>
  );
}

export function UnlockForm({ action, version }: { action: FormAction; version: number }) {
  return (
    <ChangeForm
      action={action}
      version={version}
      heading="Unlock"
      description="Lifts the lock-out now instead of waiting for it to expire, and clears the count of failed attempts."
      submitLabel="Unlock account"
      pendingLabel="Unlocking…"
    >
      {(state) => <ReasonField state={state} required={false} idPrefix="unlock" />}
    </ChangeForm>
  );
}
