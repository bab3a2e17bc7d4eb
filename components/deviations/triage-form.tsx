'use client';

import { useActionState, useCallback, useId, useState } from 'react';
import { type RiskScoreValue, RiskScoreWidget } from '@/components/risk/risk-score-widget';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import type { Classification } from '@/lib/risk/classify';
import type { RiskScales } from '@/lib/risk/scales';
import { type DeviationFormState, idleDeviationFormState } from './detail-form-state';

/*
 * The triage decision: S, O and D on the published scales with the computed class (and a written
 * justification when QA records a lower one), the investigator, and the due date. The due date
 * follows the class from the site's classification clock until QA types another date.
 */

export interface TriageFormProps {
  action: (previous: DeviationFormState, formData: FormData) => Promise<DeviationFormState>;
  deviationId: number;
  version: number;
  scales: RiskScales;
  scaleVersion: number;
  /** The defect's default class (major when the deviation names no defect). */
  defaultClassification: Classification;
  catalogueSeverity: number | null;
  caution: string | null;
  initial: { severity?: number; occurrence?: number; detection?: number };
  investigators: readonly { id: number; name: string }[];
  investigatorId: number | null;
  /** YYYY-MM-DD per class, from the clock settings. */
  dueDates: Record<Classification, string>;
  /** YYYY-MM-DD already recorded, if any. */
  dueOn: string | null;
  /** e.g. "30 days for major (site setting)". */
  dueHints: Record<Classification, string>;
}

export function TriageForm(props: TriageFormProps) {
  const [state, formAction] = useActionState(props.action, idleDeviationFormState);
  const uid = useId();
  const [currentClass, setCurrentClass] = useState<Classification>(props.defaultClassification);
  const [typedDue, setTypedDue] = useState<string | null>(props.dueOn);
  const onRiskChange = useCallback((v: RiskScoreValue) => {
    const next = v.chosen ?? v.assessment?.classification.classification;
    if (next) setCurrentClass(next);
  }, []);
  // What was typed survives a failed save in state; the form's own reset does not touch it.
  const due = typedDue ?? props.dueDates[currentClass];
  const scoreErrors = ['classification', 'severity', 'occurrence', 'detection', 'classificationReason']
    .flatMap((k) => state.fieldErrors[k] ?? []);

  return (
    <section aria-labelledby={`${uid}-heading`} className="rounded-lg border border-ink-200 bg-white p-5">
      <h3 id={`${uid}-heading`} className="text-lg font-semibold">
        Record the triage
      </h3>
      <p className="mt-1 text-ink-600">
        Score the defect, record its class, name the investigator and set the due date. Saving records the triage; open
        the investigation afterwards.
      </p>
      <form action={formAction} className="mt-4 flex flex-col gap-5" noValidate>
        {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
        <input type="hidden" name="id" value={props.deviationId} />
        <input type="hidden" name="version" value={props.version} />
        <RiskScoreWidget
          scales={props.scales}
          scaleVersion={props.scaleVersion}
          defaultClassification={props.defaultClassification}
          catalogueSeverity={props.catalogueSeverity}
          caution={props.caution}
          initial={props.initial}
          onChange={onRiskChange}
        />
        {scoreErrors.length > 0 ? (
          <p className="flex items-start gap-1 text-sm font-semibold text-danger-700">
            <span aria-hidden="true">✕</span>
            <span>{scoreErrors.join(' ')}</span>
          </p>
        ) : null}
        <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
          <SelectField
            id={`${uid}-investigator`}
            name="investigatorId"
            label="Investigator"
            hint="Active QA investigators."
            options={[{ value: '', label: 'Not assigned yet' }, ...props.investigators.map((i) => ({ value: String(i.id), label: i.name }))]}
            defaultValue={state.values.investigatorId ?? (props.investigatorId ? String(props.investigatorId) : '')}
            errors={state.fieldErrors.investigatorId}
          />
          <TextField
            id={`${uid}-due`}
            name="dueAt"
            type="date"
            label="Due date"
            hint={`Default: ${props.dueHints[currentClass]}.`}
            value={due}
            onChange={(e) => setTypedDue(e.target.value)}
            errors={state.fieldErrors.dueAt}
          />
        </div>
        <div>
          <SubmitButton pendingLabel="Saving…">Save the triage</SubmitButton>
        </div>
      </form>
    </section>
  );
}
