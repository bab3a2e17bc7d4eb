'use client';

import { useActionState, useId, useState } from 'react';
import { SelectField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import {
  aqlValues,
  defaultAql,
  defaultInspectionLevel,
  defaultSeverity,
  inspectionLevels,
  noteRequirement,
  reInspectionPlan,
  severities,
} from '@/lib/deviations/disposition-plan';
import { type Disposition, dispositionLabels } from '@/lib/deviations/labels';
import type { Aql, InspectionLevel } from '@/lib/sampling/master-tables';
import { type Severity, severityLabels } from '@/lib/sampling/plan';
import { type DeviationFormState, idleDeviationFormState } from './detail-form-state';

/*
 * One held batch's disposition. The assigned investigator records the recommendation; an independent
 * QA approver decides the final one (and must say why when it differs). A re-inspection shows its
 * ISO 2859-1 plan as the level and AQL change, from the batch size on record; the server recomputes
 * and stores the same summary.
 */

export interface DispositionFormProps {
  action: (previous: DeviationFormState, formData: FormData) => Promise<DeviationFormState>;
  deviationId: number;
  version: number;
  mode: 'recommend' | 'decide';
  /** True at approval: a final disposition that differs from the recommendation needs a note. */
  overruling: boolean;
  batch: {
    batchId: number;
    lotNumber: string;
    lotSize: number;
    recommendedDisposition: Disposition | null;
    disposition: Disposition | null;
    dispositionNote: string | null;
  };
}

const dispositionOrder: Disposition[] = ['release', 're_inspect', 'rework', 'reject'];

const dispositionHints: Record<Disposition, string> = {
  release: 'The batch may go on once no other open deviation holds it.',
  re_inspect: 'Inspect a sample to ISO 2859-1 before deciding; the batch stays on hold.',
  rework: 'Sort or rework under QA control; the batch stays on hold until released.',
  reject: 'The batch is destroyed or returned; it never ships.',
};

type AttemptState = DeviationFormState & { attempt: number };

const isDisposition = (v: string | undefined): v is Disposition => !!v && (dispositionOrder as string[]).includes(v);

export function DispositionForm(props: DispositionFormProps) {
  // Each answer remounts the form (key = attempt): React resets a form after its action runs, and a
  // fresh mount is what makes the inputs show the choices kept in state rather than their defaults.
  const [state, formAction] = useActionState(
    async (previous: AttemptState, formData: FormData): Promise<AttemptState> => ({
      ...(await props.action(previous, formData)),
      attempt: previous.attempt + 1,
    }),
    { ...idleDeviationFormState, attempt: 0 },
  );
  const uid = useId();
  const v = state.values;
  const [choice, setChoice] = useState<Disposition | null>(
    isDisposition(v.disposition) ? v.disposition : (props.batch.disposition ?? props.batch.recommendedDisposition),
  );
  const [level, setLevel] = useState<InspectionLevel>((v.inspectionLevel as InspectionLevel) || defaultInspectionLevel);
  const [aql, setAql] = useState<Aql>((v.aql as Aql) || defaultAql);
  const [severity, setSeverity] = useState<Severity>((v.inspectionSeverity as Severity) || defaultSeverity);

  const needNote = choice ? noteRequirement(choice, props.overruling ? { recommended: props.batch.recommendedDisposition } : null) : null;
  const plan = choice === 're_inspect' ? reInspectionPlan({ lotSize: props.batch.lotSize, level, aql, severity }) : null;
  const errors = state.fieldErrors;
  const noteErrors = errors.note ?? [];
  const heading = props.mode === 'recommend' ? `Recommend a disposition for ${props.batch.lotNumber}` : `Decide the disposition of ${props.batch.lotNumber}`;

  return (
    <form key={state.attempt} action={formAction} className="mt-3 flex flex-col gap-4 rounded-md border border-ink-200 bg-ink-50 p-4" noValidate aria-labelledby={`${uid}-heading`}>
      <h4 id={`${uid}-heading`} className="font-semibold">
        {heading}
      </h4>
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <input type="hidden" name="id" value={props.deviationId} />
      <input type="hidden" name="version" value={props.version} />
      <input type="hidden" name="batchId" value={props.batch.batchId} />
      {props.overruling ? (
        <p className="text-sm text-ink-700">
          Recommended by the investigator: {props.batch.recommendedDisposition ? dispositionLabels[props.batch.recommendedDisposition] : 'nothing yet'}.
        </p>
      ) : null}
      <fieldset aria-describedby={errors.disposition ? `${uid}-disposition-error` : undefined}>
        <legend className="font-semibold text-ink-900">Disposition</legend>
        <div className="mt-2 grid grid-cols-1 gap-2 sm:grid-cols-2">
          {dispositionOrder.map((d) => (
            <label
              key={d}
              className="flex min-h-11 cursor-pointer items-start gap-3 rounded-md border border-ink-300 bg-white px-3 py-2 has-[:checked]:border-2 has-[:checked]:border-ink-900 has-[:focus-visible]:outline has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-offset-2"
            >
              <input
                type="radio"
                name="disposition"
                value={d}
                defaultChecked={choice === d}
                onChange={() => setChoice(d)}
                className="mt-1 h-5 w-5 shrink-0"
              />
              <span>
                <span className="block font-semibold">{dispositionLabels[d]}</span>
                <span className="block text-sm text-ink-600">{dispositionHints[d]}</span>
              </span>
            </label>
          ))}
        </div>
        {errors.disposition ? (
          <p id={`${uid}-disposition-error`} className="mt-1 text-sm font-semibold text-danger-700">
            ✕ {errors.disposition.join(' ')}
          </p>
        ) : null}
      </fieldset>

      {choice === 're_inspect' ? (
        <div className="flex flex-col gap-3">
          <div className="grid grid-cols-1 gap-3 sm:grid-cols-3">
            <SelectField
              id={`${uid}-level`}
              name="inspectionLevel"
              label="Inspection level"
              hint="General level II unless the procedure says otherwise."
              options={inspectionLevels.map((l) => ({ value: l, label: l.startsWith('S') ? `Special ${l}` : `General ${l}` }))}
              defaultValue={level}
              onChange={(e) => setLevel(e.target.value as InspectionLevel)}
              errors={errors.inspectionLevel}
            />
            <SelectField
              id={`${uid}-aql`}
              name="aql"
              label="AQL"
              hint="Percent nonconforming (up to 10)."
              options={aqlValues.map((a) => ({ value: a, label: a }))}
              defaultValue={aql}
              onChange={(e) => setAql(e.target.value as Aql)}
              errors={errors.aql}
            />
            <SelectField
              id={`${uid}-severity`}
              name="inspectionSeverity"
              label="Inspection"
              hint="Normal at the start (ISO 2859-1, 9.1)."
              options={severities.map((s) => ({ value: s, label: severityLabels[s] }))}
              defaultValue={severity}
              onChange={(e) => setSeverity(e.target.value as Severity)}
              errors={errors.inspectionSeverity}
            />
          </div>
          <div aria-live="polite" className="rounded-md border border-ink-200 bg-white p-3">
            <p className="text-sm text-ink-600">Sampling plan for a lot of {props.batch.lotSize.toLocaleString('en-US')} capsules</p>
            {plan?.ok ? (
              <>
                <p className="font-semibold">{plan.summary}</p>
                <p className="text-sm">
                  Inspect {plan.plan.sampleSize} capsules: accept with {plan.plan.acceptance} or fewer nonconforming, reject with{' '}
                  {plan.plan.rejection} or more.
                </p>
                {plan.plan.notes.map((n) => (
                  <p key={n} className="mt-1 text-sm text-ink-700">
                    {n}
                  </p>
                ))}
              </>
            ) : (
              <p className="font-semibold text-danger-700">{plan?.message}</p>
            )}
          </div>
        </div>
      ) : null}

      <div className="flex flex-col gap-1">
        <label htmlFor={`${uid}-note`} className="font-semibold text-ink-900">
          Note {needNote ? <span className="font-normal text-ink-600">(required)</span> : <span className="font-normal text-ink-600">(optional)</span>}
        </label>
        <p id={`${uid}-note-hint`} className="text-sm text-ink-600">
          {needNote ?? 'What the decision rests on: test results, sorting records, the AQL outcome.'}
        </p>
        <textarea
          id={`${uid}-note`}
          name="note"
          rows={3}
          maxLength={2000}
          required={needNote !== null}
          defaultValue={v.note ?? (props.overruling ? '' : (props.batch.dispositionNote ?? ''))}
          aria-invalid={noteErrors.length > 0 ? true : undefined}
          aria-describedby={noteErrors.length > 0 ? `${uid}-note-hint ${uid}-note-error` : `${uid}-note-hint`}
          className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base text-ink-900 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
        />
        {noteErrors.length > 0 ? (
          <p id={`${uid}-note-error`} className="text-sm font-semibold text-danger-700">
            ✕ {noteErrors.join(' ')}
          </p>
        ) : null}
      </div>
      <div>
        <SubmitButton pendingLabel="Saving…">{props.mode === 'recommend' ? 'Save the recommendation' : 'Save the disposition'}</SubmitButton>
      </div>
    </form>
  );
}
