'use client';

import { useActionState } from 'react';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { signInAction } from './actions';
import type { SignInState } from './state';

export function SignInForm({ callbackUrl, initialError }: { callbackUrl: string; initialError: string | null }) {
  const [state, formAction] = useActionState<SignInState, FormData>(signInAction, {
    email: '',
    error: initialError,
  });
  return (
    <form action={formAction} className="flex flex-col gap-5" noValidate>
      {state.error ? <Notice tone="danger" title={state.error} /> : null}
      <input type="hidden" name="callbackUrl" value={callbackUrl} />
      <TextField
        name="email"
        label="E-mail"
        type="email"
        inputMode="email"
        autoComplete="username"
        autoCapitalize="none"
        spellCheck={false}
        defaultValue={state.email}
        required
      />
      <TextField name="password" label="Password" type="password" autoComplete="current-password" required />
      <SubmitButton pendingLabel="Signing in…" className="w-full">
        Sign in
      </SubmitButton>
    </form>
  );
}
