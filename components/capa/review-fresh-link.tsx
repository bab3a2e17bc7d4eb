'use client';

import { useActionState } from 'react';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';

/* Asks for a fresh review link by e-mail, to the person signed in; says where it went and until when. */

export type FreshLinkState = { status: 'idle' } | { status: 'sent'; email: string; expiresAt: string } | { status: 'failed'; message: string };

export function ReviewFreshLinkForm({
  action,
  token,
}: {
  action: (previous: FreshLinkState, formData: FormData) => Promise<FreshLinkState>;
  token: string;
}) {
  const [state, formAction] = useActionState(action, { status: 'idle' });
  if (state.status === 'sent') {
    return (
      <Notice tone="ok" title={`A fresh link is on its way to ${state.email}.`}>
        It works once, until {state.expiresAt}. Earlier links to this review no longer work.
      </Notice>
    );
  }
  return (
    <form action={formAction} className="flex flex-col gap-3">
      {state.status === 'failed' ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="token" value={token} />
      <div>
        <SubmitButton pendingLabel="Sending…" variant="secondary">
          E-mail me a fresh link
        </SubmitButton>
      </div>
    </form>
  );
}
