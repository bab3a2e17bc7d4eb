'use client';

import { useActionState } from 'react';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import {
  riskDescriptionMaxLength,
  riskDimensionLabels,
  riskDimensionLetters,
  riskDimensions,
  riskLabelMaxLength,
  riskScores,
} from '@/lib/risk/scales';
import { riskLevelFieldName, riskScaleNoteMaxLength } from '@/lib/validation/risk';
import { idlePublishScalesState, type PublishScalesFormState } from './publish-form-state';

/*
 * Edits the wording of all 30 steps, starting from the current version, and publishes them as the
 * next version. Typed values survive a refused submission (React resets a form after its action).
 */

const inputClasses =
  'block w-full min-h-11 rounded-md border border-ink-400 bg-white px-3 py-2 text-base text-ink-900 ' +
  'aria-[invalid=true]:border-danger-700 aria-[invalid=true]:border-2';

function FieldError({ id, errors }: { id: string; errors: readonly string[] | undefined }) {
  if (!errors || errors.length === 0) return null;
  return (
    <p id={id} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
      <span aria-hidden="true">✕</span>
      <span>{errors.join(' ')}</span>
    </p>
  );
}

export function PublishScalesForm({
  action,
  basedOnVersion,
  initialValues,
}: {
  action: (previous: PublishScalesFormState, formData: FormData) => Promise<PublishScalesFormState>;
  basedOnVersion: number;
  initialValues: Record<string, string>;
}) {
  const [state, formAction] = useActionState(action, idlePublishScalesState);
  const values = state.status === 'failed' ? state.values : initialValues;
  const e = state.fieldErrors;
  const errorCount = Object.keys(e).length;
  return (
    <form action={formAction} className="flex flex-col gap-6" noValidate>
      <input type="hidden" name="basedOnVersion" value={basedOnVersion} />
      {state.status === 'failed' && state.message ? (
        <Notice tone="danger" title={state.message}>
          {errorCount > 0 ? `${errorCount} field${errorCount === 1 ? '' : 's'} to check; each message is under its field.` : null}
        </Notice>
      ) : null}
      {riskDimensions.map((d) => (
        <fieldset key={d} className="rounded-lg border border-ink-300 bg-white p-4">
          <legend className="px-1 text-lg font-semibold">
            {riskDimensionLabels[d]} ({riskDimensionLetters[d]})
          </legend>
          <div className="flex flex-col divide-y divide-ink-200">
            {riskScores.map((score) => {
              const labelName = riskLevelFieldName(d, score, 'label');
              const descriptionName = riskLevelFieldName(d, score, 'description');
              const labelErrors = e[labelName];
              const descriptionErrors = e[descriptionName];
              return (
                <div key={score} className="grid gap-2 py-3 md:grid-cols-[3rem_minmax(0,16rem)_minmax(0,1fr)] md:items-start">
                  <p className="text-xl font-bold tabular-nums md:pt-8 md:text-right">{score}</p>
                  <div className="flex flex-col gap-1">
                    <label htmlFor={`f-${labelName}`} className="font-semibold">
                      {riskDimensionLabels[d]} {score}: label
                    </label>
                    <input
                      id={`f-${labelName}`}
                      name={labelName}
                      defaultValue={values[labelName] ?? ''}
                      maxLength={riskLabelMaxLength}
                      required
                      aria-invalid={labelErrors ? true : undefined}
                      aria-describedby={labelErrors ? `e-${labelName}` : undefined}
                      className={inputClasses}
                    />
                    <FieldError id={`e-${labelName}`} errors={labelErrors} />
                  </div>
                  <div className="flex flex-col gap-1">
                    <label htmlFor={`f-${descriptionName}`} className="font-semibold">
                      {riskDimensionLabels[d]} {score}: description
                    </label>
                    <textarea
                      id={`f-${descriptionName}`}
                      name={descriptionName}
                      defaultValue={values[descriptionName] ?? ''}
                      maxLength={riskDescriptionMaxLength}
                      rows={2}
                      required
                      aria-invalid={descriptionErrors ? true : undefined}
                      aria-describedby={descriptionErrors ? `e-${descriptionName}` : undefined}
                      className={inputClasses}
                    />
                    <FieldError id={`e-${descriptionName}`} errors={descriptionErrors} />
                  </div>
                </div>
              );
            })}
          </div>
        </fieldset>
      ))}
      <div className="flex max-w-2xl flex-col gap-1">
        <label htmlFor="f-note" className="font-semibold">
          What changed and why <span className="font-normal text-ink-600">(required)</span>
        </label>
        <p id="f-note-hint" className="text-sm text-ink-600">
          Kept with the version and in the audit trail. Scores already recorded keep the version they were made with.
        </p>
        <textarea
          id="f-note"
          name="note"
          rows={3}
          maxLength={riskScaleNoteMaxLength}
          defaultValue={state.values.note ?? ''}
          required
          aria-invalid={e.note ? true : undefined}
          aria-describedby={e.note ? 'f-note-hint e-note' : 'f-note-hint'}
          className={inputClasses}
        />
        <FieldError id="e-note" errors={e.note} />
      </div>
      <div>
        <SubmitButton pendingLabel="Publishing…">Publish version {basedOnVersion + 1}</SubmitButton>
      </div>
    </form>
  );
}
