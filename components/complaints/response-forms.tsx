'use client';

import dynamic from 'next/dynamic';
import { useActionState, useId, useState } from 'react';
import { FieldError } from '@/components/ui/form-bits';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { type ComplaintFormAction, idleComplaintFormState } from './form-state';

/*
 * The answer to the complainant: the letter in the rich-text editor (loaded on demand), first filled
 * from the template with the record's facts, saved and cleaned on the server; then sent by e-mail to
 * the address on record or recorded as posted. What is typed survives a refused save.
 */

function EditorLoading() {
  return (
    <div aria-busy="true" className="min-h-60 rounded-md border border-ink-400 bg-ink-50 px-3 py-2 text-ink-600">
      Loading the editor…
    </div>
  );
}

const RichTextEditor = dynamic(() => import('@/components/rich-text/rich-text-editor').then((m) => m.RichTextEditor), {
  ssr: false,
  loading: EditorLoading,
});

export function LetterForm({ action, complaintId, version, initialHtml }: { action: ComplaintFormAction; complaintId: number; version: number; initialHtml: string }) {
  const [state, formAction] = useActionState(action, idleComplaintFormState);
  const [letter, setLetter] = useState(initialHtml);
  const uid = useId();
  const errors = state.fieldErrors.letter;
  return (
    <form action={formAction} noValidate className="flex flex-col gap-3" data-testid="letter-form">
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={complaintId} />
      <input type="hidden" name="version" value={version} />
      <p id={`${uid}-label`} className="font-semibold text-ink-900">
        Letter to the complainant
      </p>
      <p id={`${uid}-hint`} className="text-sm text-ink-600">
        Filled from the record; replace every [bracketed] note before sending. Headings, lists, tables and links are kept; anything else is removed when saved.
      </p>
      <RichTextEditor
        name="letter"
        labelledBy={`${uid}-label`}
        describedBy={[`${uid}-hint`, errors ? `${uid}-error` : null].filter(Boolean).join(' ')}
        initialHtml={letter}
        invalid={Boolean(errors)}
        onChange={setLetter}
      />
      <FieldError id={`${uid}-error`} errors={errors} />
      <div>
        <SubmitButton pendingLabel="Saving…" variant="secondary">
          Save the letter
        </SubmitButton>
      </div>
    </form>
  );
}

export function SendForm({
  action,
  complaintId,
  version,
  contact,
  emailPossible,
}: {
  action: ComplaintFormAction;
  complaintId: number;
  version: number;
  contact: string;
  emailPossible: boolean;
}) {
  const [state, formAction] = useActionState(action, idleComplaintFormState);
  const uid = useId();
  const chosen = state.values.channel ?? (emailPossible ? 'email' : 'post');
  return (
    <form action={formAction} noValidate className="flex flex-col gap-3" data-testid="send-form">
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={complaintId} />
      <input type="hidden" name="version" value={version} />
      <fieldset className="flex flex-col gap-1">
        <legend className="font-semibold text-ink-900">Send the saved letter</legend>
        <label className="inline-flex min-h-11 items-center gap-2">
          <input type="radio" name="channel" value="email" defaultChecked={chosen === 'email'} disabled={!emailPossible} className="h-5 w-5" />
          By e-mail to {contact}
          {emailPossible ? null : <span className="text-ink-600">(not an e-mail address)</span>}
        </label>
        <label className="inline-flex min-h-11 items-center gap-2">
          <input type="radio" name="channel" value="post" defaultChecked={chosen === 'post'} className="h-5 w-5" />
          Printed and sent by post (record it as sent)
        </label>
        <FieldError id={`${uid}-channel`} errors={state.fieldErrors.channel} />
        <FieldError id={`${uid}-letter`} errors={state.fieldErrors.letter} />
      </fieldset>
      <div>
        <SubmitButton pendingLabel="Sending…">Send the answer</SubmitButton>
      </div>
    </form>
  );
}
