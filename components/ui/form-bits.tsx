'use client';

import { useId } from 'react';

/* Small pieces the record forms share: a labelled text area and an error line tied to its field. */

export function FieldError({ id, errors }: { id: string; errors: readonly string[] | undefined }) {
  if (!errors || errors.length === 0) return null;
  return (
    <p id={id} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
      <span aria-hidden="true">✕</span>
      <span>{errors.join(' ')}</span>
    </p>
  );
}

export function TextArea({
  name,
  label,
  hint,
  errors,
  defaultValue,
  required,
  rows = 4,
  maxLength,
}: {
  name: string;
  label: string;
  hint?: string;
  errors?: readonly string[];
  defaultValue?: string;
  required?: boolean;
  rows?: number;
  maxLength?: number;
}) {
  const uid = useId();
  const id = `${uid}-${name}`;
  const invalid = Boolean(errors && errors.length > 0);
  const describedBy = [hint ? `${id}-hint` : null, invalid ? `${id}-error` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div className="flex flex-col gap-1">
      <p className="flex flex-wrap items-baseline gap-x-1">
        <label htmlFor={id} className="font-semibold text-ink-900">
          {label}
        </label>
        {required ? (
          <span aria-hidden="true" className="text-ink-600">
            (required)
          </span>
        ) : null}
      </p>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-ink-600">
          {hint}
        </p>
      ) : null}
      <textarea
        id={id}
        name={name}
        rows={rows}
        required={required}
        maxLength={maxLength}
        defaultValue={defaultValue}
        aria-invalid={invalid ? true : undefined}
        aria-describedby={describedBy}
        className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base text-ink-900 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
      />
      <FieldError id={`${id}-error`} errors={errors} />
    </div>
  );
}

/** Field errors the form has no field for (e.g. "add at least one action") still reach the person. */
export function OtherErrors({ fieldErrors, shown }: { fieldErrors: Record<string, string[]>; shown: readonly string[] }) {
  const uid = useId();
  const rest = Object.entries(fieldErrors).filter(([k]) => !shown.includes(k));
  if (rest.length === 0) return null;
  return (
    <>
      {rest.map(([k, errors]) => (
        <FieldError key={k} id={`${uid}-${k}`} errors={errors} />
      ))}
    </>
  );
}
