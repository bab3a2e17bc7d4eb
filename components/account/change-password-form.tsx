'use client';

import Link from 'next/link';
import { useActionState } from 'react';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { buttonClasses } from '@/components/ui/button';
import { SubmitButton } from '@/components/ui/submit-button';
import { idlePasswordFormState, type PasswordFormState } from './password-form-state';

/*
 * Current password, new password, and the new one again. Each problem is shown under its own field;
 * after a success the form is empty again and a link leads on to where the person was going.
 */

export function ChangePasswordForm({
  action,
  passwordMinLength,
  continueHref,
}: {
  action: (previous: PasswordFormState, formData: FormData) => Promise<PasswordFormState>;
  passwordMinLength: number;
  continueHref: string;
}) {
  const [state, formAction] = useActionState(action, idlePasswordFormState);
  const e = state.fieldErrors;
  return (
    <form action={formAction} className="flex max-w-xl flex-col gap-5" noValidate>
      {state.status === 'failed' && state.message ? <Notice tone="danger" title={state.message} /> : null}
      {state.status === 'saved' && state.message ? (
        <Notice tone="ok" title={state.message}>
          <Link href={continueHref} className={buttonClasses('secondary', 'mt-2')}>
            Continue
          </Link>
        </Notice>
      ) : null}
      <TextField name="currentPassword" label="Current password" type="password" autoComplete="current-password"
        errors={e.currentPassword} required
        hint="The one you signed in with. After a reset, that is the temporary password your administrator gave you." />
      <TextField name="newPassword" label="New password" type="password" autoComplete="new-password"
        minLength={passwordMinLength} errors={e.newPassword} required
        hint={`At least ${passwordMinLength} characters. Only you should know it: it also signs your records.`} />
      <TextField name="confirmPassword" label="New password again" type="password" autoComplete="new-password"
        errors={e.confirmPassword} required />
      <div>
        <SubmitButton pendingLabel="Changing…">Change password</SubmitButton>
      </div>
    </form>
  );
}
