import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from 'react';

/*
 * Labelled form fields. The error text sits under the field, is tied to it with aria-describedby
 * and marks it aria-invalid, so a screen reader hears the problem when the field gets focus.
 */

const controlClasses =
  'block w-full min-h-11 rounded-md border bg-white px-3 py-2 text-base text-ink-900 placeholder:text-ink-500 ' +
  'aria-[invalid=true]:border-danger-700 aria-[invalid=true]:border-2';

interface FieldShellProps {
  id: string;
  label: string;
  hint?: ReactNode;
  errors?: readonly string[] | undefined;
  required?: boolean;
  children: ReactNode;
}

function FieldShell({ id, label, hint, errors, required, children }: FieldShellProps) {
  return (
    <div className="flex flex-col gap-1">
      <p className="flex flex-wrap items-baseline gap-x-1">
        <label htmlFor={id} className="font-semibold text-ink-900">
          {label}
        </label>
        {required ? (
          // Beside the label, not in it: the control carries `required` for assistive technology,
          // and the label stays the field's plain name.
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
      {children}
      {errors && errors.length > 0 ? (
        <p id={`${id}-error`} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
          <span aria-hidden="true">✕</span>
          <span>{errors.join(' ')}</span>
        </p>
      ) : null}
    </div>
  );
}

function describedBy(id: string, hint: unknown, errors: readonly string[] | undefined) {
  const ids = [hint ? `${id}-hint` : null, errors && errors.length > 0 ? `${id}-error` : null].filter(Boolean);
  return ids.length > 0 ? ids.join(' ') : undefined;
}

type TextFieldProps = Omit<InputHTMLAttributes<HTMLInputElement>, 'id' | 'name'> & {
  name: string;
  label: string;
  hint?: ReactNode;
  errors?: readonly string[] | undefined;
  id?: string;
};

export function TextField({ name, label, hint, errors, id, required, className = '', ...input }: TextFieldProps) {
  const fieldId = id ?? `field-${name}`;
  const invalid = errors && errors.length > 0;
  return (
    <FieldShell id={fieldId} label={label} hint={hint} errors={errors} required={required}>
      <input
        id={fieldId}
        name={name}
        required={required}
        aria-invalid={invalid ? true : undefined}
        aria-describedby={describedBy(fieldId, hint, errors)}
        className={`${controlClasses} border-ink-400 ${className}`}
        {...input}
      />
    </FieldShell>
  );
}

type SelectFieldProps = Omit<SelectHTMLAttributes<HTMLSelectElement>, 'id' | 'name'> & {
  name: string;
  label: string;
  options: readonly { value: string; label: string }[];
  hint?: ReactNode;
  errors?: readonly string[] | undefined;
  id?: string;
};

export function SelectField({ name, label, options, hint, errors, id, required, ...select }: SelectFieldProps) {
  const fieldId = id ?? `field-${name}`;
  const invalid = errors && errors.length > 0;
  return (
    <FieldShell id={fieldId} label={label} hint={hint} errors={errors} required={required}>
      <select
        id={fieldId}
        name={name}
        required={required}
        aria-invalid={invalid ? true : undefined}
        aria-describedby={describedBy(fieldId, hint, errors)}
        className={`${controlClasses} border-ink-400`}
        {...select}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldShell>
  );
}
