'use client';

import { useRouter } from 'next/navigation';
import { useId, useRef, useState, useTransition } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import type { ActionResult } from '@/lib/define-action';
import type { CommentDto, MentionOptionDto } from '@/lib/comments/queries';
import { extractMentions, maxCommentLength } from '@/lib/comments/mentions';

/*
 * Writing a comment. People are mentioned by @ and the part of their e-mail before the @; the
 * helper below the text inserts that for a person picked from the list, and the form says who will
 * get an e-mail before sending. The text stays in the box until the server has kept it.
 */

export interface CommentFormProps {
  recordId: number;
  people: MentionOptionDto[];
  action: (previous: ActionResult<CommentDto> | null, form: FormData) => Promise<ActionResult<CommentDto>>;
}

export function CommentForm({ recordId, people, action }: CommentFormProps) {
  const router = useRouter();
  const [body, setBody] = useState('');
  const [pick, setPick] = useState('');
  const [errors, setErrors] = useState<string[] | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const [pending, startTransition] = useTransition();
  const text = useRef<HTMLTextAreaElement>(null);
  const id = useId();

  const byHandle = new Map(people.map((p) => [p.handle.toLowerCase(), p]));
  const mentioned = extractMentions(body);
  const notified = mentioned.map((h) => byHandle.get(h)).filter((p): p is MentionOptionDto => p !== undefined);
  const unknown = mentioned.filter((h) => !byHandle.has(h));

  function insertMention() {
    const person = people.find((p) => String(p.id) === pick);
    if (!person) return;
    const el = text.current;
    const at = el?.selectionStart ?? body.length;
    const before = body.slice(0, at);
    const token = `${before === '' || /\s$/.test(before) ? '' : ' '}@${person.handle} `;
    const next = before + token + body.slice(at);
    setBody(next);
    setPick('');
    requestAnimationFrame(() => {
      el?.focus();
      el?.setSelectionRange(at + token.length, at + token.length);
    });
  }

  function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData();
    form.set('deviationId', String(recordId));
    form.set('body', body);
    setSaved(false);
    startTransition(async () => {
      try {
        const result = await action(null, form);
        if (result.ok) {
          setBody('');
          setErrors(null);
          setMessage(null);
          setSaved(true);
          router.refresh();
        } else {
          setErrors(result.fieldErrors.body ?? null);
          setMessage(result.fieldErrors.body ? null : result.message);
        }
      } catch {
        setMessage('The server could not be reached. Your comment is still in the box; send it again when the connection is back.');
      }
    });
  }

  const describedBy = [`${id}-hint`, errors ? `${id}-error` : null].filter(Boolean).join(' ');
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-3">
      {message ? <Notice tone="danger" title="Comment not saved">{message}</Notice> : null}
      {saved ? <Notice tone="ok" title="Comment added." /> : null}
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-body`} className="font-semibold text-ink-900">
          Your comment
        </label>
        <p id={`${id}-hint`} className="text-sm text-ink-600">
          Plain text. Write @ and a name from the list below to send that person an e-mail.
        </p>
        <textarea
          ref={text}
          id={`${id}-body`}
          name="body"
          rows={4}
          maxLength={maxCommentLength}
          value={body}
          onChange={(e) => {
            setBody(e.target.value);
            setErrors(null);
            setSaved(false);
          }}
          aria-invalid={errors ? true : undefined}
          aria-describedby={describedBy}
          className="block w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
        />
        {errors ? (
          <div id={`${id}-error`} className="text-sm font-semibold text-danger-700">
            {errors.map((e) => (
              <p key={e}>✕ {e}</p>
            ))}
          </div>
        ) : null}
        <p className="text-right text-sm text-ink-600" aria-live="polite">
          {body.length.toLocaleString('en')} / {maxCommentLength.toLocaleString('en')}
        </p>
      </div>
      {people.length > 0 ? (
        <div className="flex flex-wrap items-end gap-2">
          <div className="flex min-w-56 flex-1 flex-col gap-1">
            <label htmlFor={`${id}-person`} className="text-sm font-semibold text-ink-900">
              Mention someone
            </label>
            <select
              id={`${id}-person`}
              value={pick}
              onChange={(e) => setPick(e.target.value)}
              className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base"
            >
              <option value="">— pick a person —</option>
              {people.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name} (@{p.handle})
                </option>
              ))}
            </select>
          </div>
          <Button variant="secondary" disabled={!pick} onClick={insertMention}>
            Insert mention
          </Button>
        </div>
      ) : null}
      {notified.length > 0 || unknown.length > 0 ? (
        <p className="text-sm text-ink-700">
          {notified.length > 0 ? <>E-mail to: {notified.map((p) => p.name).join(', ')}. </> : null}
          {unknown.length > 0 ? <span className="font-semibold text-warn-700">Not in the list: {unknown.map((h) => `@${h}`).join(', ')}.</span> : null}
        </p>
      ) : null}
      <div>
        <Button type="submit" disabled={pending || body.trim() === ''}>
          {pending ? 'Sending…' : 'Add comment'}
        </Button>
      </div>
    </form>
  );
}
