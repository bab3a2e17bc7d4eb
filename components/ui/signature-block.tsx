/*
 * The electronic signature part of a form: the meaning and the statement the signer reads before
 * entering the password (21 CFR 11.50(a)(3), 11.200(a)), the password field and its error.
 */
export function SignatureBlock({
  id,
  meaningLabel,
  statement,
  signerName,
  errors,
}: {
  id: string;
  meaningLabel: string;
  statement: string;
  signerName: string;
  errors: readonly string[] | undefined;
}) {
  const invalid = Boolean(errors && errors.length > 0);
  return (
    <fieldset className="flex flex-col gap-2 rounded-md border border-brass-600 bg-brass-50 p-4">
      <legend className="px-1 font-semibold">Electronic signature: {meaningLabel}</legend>
      <p className="text-ink-800">
        Signing as <strong>{signerName}</strong>. {statement} Your password is your signature; it is the legally
        binding equivalent of your handwritten one.
      </p>
      <label htmlFor={`${id}-password`} className="font-semibold text-ink-900">
        Password
      </label>
      <input
        id={`${id}-password`}
        name="password"
        type="password"
        autoComplete="current-password"
        required
        aria-invalid={invalid ? true : undefined}
        aria-describedby={invalid ? `${id}-password-error` : undefined}
        className="block min-h-11 w-full max-w-sm rounded-md border border-ink-400 bg-white px-3 py-2 text-base aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
      />
      {invalid ? (
        <p id={`${id}-password-error`} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
          <span aria-hidden="true">✕</span>
          <span>{errors!.join(' ')}</span>
        </p>
      ) : null}
    </fieldset>
  );
}
