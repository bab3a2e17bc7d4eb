'use client';

import { useMemo, useState } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { aqlValues, inspectionLevels } from '@/lib/sampling/master-tables';
import { findSamplingPlan, type PlanLookup, severities, severityLabels } from '@/lib/sampling/plan';
import {
  type SamplingFormValues,
  type SamplingInput,
  samplingInputSchema,
} from '@/lib/validation/sampling';

/*
 * The calculator recomputes on every keystroke (the lookup is a few array reads) and mirrors the
 * inputs into the address bar, so the plan can be bookmarked or pasted into a deviation record.
 */

const count = new Intl.NumberFormat('en-US');

const levelOptions = inspectionLevels.map((l) => ({
  value: l,
  label: l.startsWith('S') ? `Special ${l}` : `General ${l}${l === 'II' ? ' (usual)' : ''}`,
}));
const severityOptions = severities.map((s) => ({ value: s, label: severityLabels[s] }));
const aqlOptions = aqlValues.map((a) => ({ value: a, label: a }));
const criticalOptions = [
  { value: 'hundred_percent', label: '100 % inspection, 0 accepted' },
  ...aqlOptions.map((o) => ({ value: o.value, label: `AQL ${o.label} (site SOP)` })),
];

type DefectClass = 'critical' | 'major' | 'minor';
const classLabels: Record<DefectClass, string> = { critical: 'Critical', major: 'Major', minor: 'Minor' };

export function SamplingCalculator({ initial }: { initial: SamplingFormValues }) {
  const [values, setValues] = useState<SamplingFormValues>(initial);
  const parsed = useMemo(() => samplingInputSchema.safeParse(values), [values]);
  const errors = parsed.success ? {} : flatten(parsed.error);
  const showLotError = values.lotSize.trim() !== '';

  function update(name: keyof SamplingFormValues, value: string) {
    const next = { ...values, [name]: value };
    setValues(next);
    const params = new URLSearchParams(Object.entries(next).filter(([, v]) => v !== ''));
    window.history.replaceState(null, '', `?${params.toString()}`);
  }

  return (
    <div className="flex flex-col gap-6">
      <form
        aria-label="Lot and acceptance quality limits"
        className="grid gap-4 rounded-lg border border-ink-200 bg-white p-4 sm:grid-cols-2 lg:grid-cols-3"
        onSubmit={(e) => e.preventDefault()}
      >
        <TextField
          name="lotSize"
          label="Lot size (capsules)"
          inputMode="numeric"
          autoComplete="off"
          required
          hint="Capsules in the affected lot, e.g. 250000."
          value={values.lotSize}
          onChange={(e) => update('lotSize', e.target.value)}
          errors={showLotError ? errors.lotSize : undefined}
        />
        <SelectField
          name="level"
          label="Inspection level"
          options={levelOptions}
          value={values.level}
          onChange={(e) => update('level', e.target.value)}
          errors={errors.level}
        />
        <SelectField
          name="severity"
          label="Severity of inspection"
          options={severityOptions}
          value={values.severity}
          onChange={(e) => update('severity', e.target.value)}
          errors={errors.severity}
          hint="Normal unless the switching rules below moved you."
        />
        <SelectField
          name="critical"
          label="Critical defects"
          options={criticalOptions}
          value={values.critical}
          onChange={(e) => update('critical', e.target.value)}
          errors={errors.critical}
          hint="Default: every capsule, none accepted, or as the site SOP says."
        />
        <SelectField
          name="major"
          label="Major defects: AQL"
          options={aqlOptions}
          value={values.major}
          onChange={(e) => update('major', e.target.value)}
          errors={errors.major}
          hint="Common practice 0.65; editable."
        />
        <SelectField
          name="minor"
          label="Minor defects: AQL"
          options={aqlOptions}
          value={values.minor}
          onChange={(e) => update('minor', e.target.value)}
          errors={errors.minor}
          hint="Common practice 2.5; editable."
        />
      </form>

      <section aria-labelledby="plans-heading" aria-live="polite" className="flex flex-col gap-3">
        <h2 id="plans-heading" className="text-xl font-bold text-ink-900">
          Plans
        </h2>
        {parsed.success ? (
          <>
            <p className="text-ink-700">
              Lot of {count.format(parsed.data.lotSize)} capsules, {levelLabel(parsed.data.level)},{' '}
              {severityLabels[parsed.data.severity].toLowerCase()} inspection. Single sampling, ISO 2859-1:1999.
            </p>
            <ul className="grid gap-3 lg:grid-cols-3">
              {(['critical', 'major', 'minor'] as const).map((c) => (
                <li key={c}>
                  <PlanCard defectClass={c} input={parsed.data} />
                </li>
              ))}
            </ul>
          </>
        ) : (
          <p className="text-ink-700">Enter the lot size to see the plans.</p>
        )}
      </section>
    </div>
  );
}

function levelLabel(level: string): string {
  return level.startsWith('S') ? `special level ${level}` : `general level ${level}`;
}

function flatten(error: import('zod').ZodError): Partial<Record<keyof SamplingFormValues, string[]>> {
  const out: Partial<Record<keyof SamplingFormValues, string[]>> = {};
  for (const issue of error.issues) {
    const key = issue.path[0] as keyof SamplingFormValues;
    out[key] = [...(out[key] ?? []), issue.message];
  }
  return out;
}

function PlanCard({ defectClass, input }: { defectClass: DefectClass; input: SamplingInput }) {
  const choice = input[defectClass];
  const heading = `${classLabels[defectClass]} defects`;

  if (choice === 'hundred_percent') {
    return (
      <article className="flex h-full flex-col gap-2 rounded-lg border-2 border-danger-700 bg-white p-4">
        <h3 className="text-lg font-bold text-ink-900">{heading}</h3>
        <p className="text-2xl font-bold tabular-nums text-ink-900">Inspect all {count.format(input.lotSize)}</p>
        <p className="text-ink-800">Accept only if no capsule has a critical defect (Ac 0, Re 1).</p>
      </article>
    );
  }

  const lookup: PlanLookup = findSamplingPlan({
    lotSize: input.lotSize,
    level: input.level,
    aql: choice,
    severity: input.severity,
  });

  if (!lookup.ok) {
    return (
      <article className="flex h-full flex-col gap-2 rounded-lg border border-ink-200 bg-white p-4">
        <h3 className="text-lg font-bold text-ink-900">
          {heading} <span className="font-normal text-ink-600">· AQL {choice}</span>
        </h3>
        <Notice tone="warn" title="No plan in the table" live={false}>
          {lookup.reason}
        </Notice>
      </article>
    );
  }

  const p = lookup.plan;
  return (
    <article className="flex h-full flex-col gap-2 rounded-lg border border-ink-200 bg-white p-4">
      <h3 className="text-lg font-bold text-ink-900">
        {heading} <span className="font-normal text-ink-600">· AQL {p.aql}</span>
      </h3>
      <p className="text-ink-900">
        Inspect <strong className="tabular-nums">{count.format(p.sampleSize)}</strong> capsules
        {p.hundredPercent ? ' (the whole lot)' : ''}; accept if{' '}
        <strong className="tabular-nums">≤ {p.acceptance}</strong> defects, reject if{' '}
        <strong className="tabular-nums">≥ {p.rejection}</strong>.
      </p>
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
        <dt className="text-ink-600">Table</dt>
        <dd>{p.table}</dd>
        <dt className="text-ink-600">Code letter</dt>
        <dd>
          {p.lookedUpLetter === p.letter ? p.letter : `${p.lookedUpLetter} → ${p.letter} (arrow followed)`}
        </dd>
        <dt className="text-ink-600">Sample size</dt>
        <dd className="tabular-nums">{count.format(p.tableSampleSize)}</dd>
        <dt className="text-ink-600">Ac / Re</dt>
        <dd className="tabular-nums">
          {p.acceptance} / {p.rejection}
        </dd>
      </dl>
      {p.notes.map((note) => (
        <Notice key={note} tone="info" live={false}>
          {note}
        </Notice>
      ))}
    </article>
  );
}
