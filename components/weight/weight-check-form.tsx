'use client';

import { useActionState, useMemo, useState, type ChangeEvent } from 'react';
import { useFormStatus } from 'react-dom';
import { buttonClasses } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import type { WeightBatchDto } from '@/lib/weight-checks/types';
import { type MassMode, type WeightMethod, defaultMethod, evaluateWeightCheck, methodLabels, weightMethods } from '@/lib/weight/evaluate';
import { hintSource } from '@/lib/weight/hints';
import { formatLineError, parseMasses } from '@/lib/weight/parse';
import type { WeightEvaluation } from '@/lib/weight/evaluate';
import { type WeightFormState, idleWeightFormState } from './form-state';
import { MassChart } from './mass-chart';
import { RuleList } from './rule-list';
import { SummaryNumbers } from './summary-numbers';

/*
 * Records a weight check. Everything is evaluated in the browser on each keystroke with the same
 * pure code the server runs again before saving, so the operator sees the verdict, the numbers,
 * the chart and the rules before pressing "Record check".
 */

const inputClasses =
  'block w-full min-h-11 rounded-md border border-ink-400 bg-white px-3 py-2 text-base text-ink-900 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700';

function FieldError({ id, errors }: { id: string; errors: string[] | undefined }) {
  if (!errors || errors.length === 0) return null;
  return (
    <p id={id} className="text-sm font-semibold text-danger-700">
      ✕ {errors.join(' ')}
    </p>
  );
}

function RecordButton({ ready }: { ready: boolean }) {
  const { pending } = useFormStatus();
  return (
    <button type="submit" className={buttonClasses('primary')} disabled={!ready || pending} aria-disabled={!ready || pending}>
      {pending ? 'Recording…' : 'Record check'}
    </button>
  );
}

export function WeightCheckForm({
  batch,
  action,
  canRecord,
}: {
  batch: WeightBatchDto;
  action: (state: WeightFormState, formData: FormData) => Promise<WeightFormState>;
  canRecord: boolean;
}) {
  const [state, formAction] = useActionState(action, idleWeightFormState);
  const v = state.values;
  const [method, setMethod] = useState<WeightMethod>((v.method as WeightMethod) || defaultMethod(batch.product.regulatoryClass));
  const [massMode, setMassMode] = useState<MassMode>((v.massMode as MassMode) || 'net');
  const [shell, setShell] = useState(v.shellMassMg ?? '');
  const [masses, setMasses] = useState(v.masses ?? '');
  const [assay, setAssay] = useState(v.assayPercent ?? '');
  const [fileNote, setFileNote] = useState<string | null>(null);

  const parsed = useMemo(() => parseMasses(masses), [masses]);
  const limits = useMemo(
    () => ({ targetMg: batch.product.targetFillMg, lowerMg: batch.product.fillLowerMg, upperMg: batch.product.fillUpperMg }),
    [batch],
  );
  const shellMg = shell.trim() === '' ? null : Number(shell.replace(',', '.'));
  const evaluation = useMemo(
    () =>
      evaluateWeightCheck({
        method,
        massMode,
        massesMg: parsed.massesMg,
        shellMassMg: shellMg !== null && Number.isFinite(shellMg) ? shellMg : null,
        product: limits,
        assayPercent: assay.trim() === '' ? undefined : Number(assay.replace(',', '.')) || undefined,
      }),
    [method, massMode, parsed, shellMg, assay, limits],
  );
  const ready = canRecord && parsed.errors.length === 0 && evaluation.verdict !== 'incomplete';

  async function readFile(e: ChangeEvent<HTMLInputElement>) {
    const file = e.target.files?.[0];
    if (!file) return;
    if (file.size > 200_000) {
      setFileNote(`${file.name} is larger than a balance export of one check; pick the right file.`);
      return;
    }
    setMasses(await file.text());
    setFileNote(`Read ${file.name}. Check the masses below before recording.`);
  }

  const err = state.fieldErrors;
  return (
    <form action={formAction} className="flex flex-col gap-6" noValidate>
      <input type="hidden" name="batchId" value={batch.id} />
      <input type="hidden" name="lot" value={batch.lotNumber} />
      {state.failed && state.message ? <Notice tone="danger" title="The check was not recorded">{state.message}</Notice> : null}

      <div className="grid gap-4 md:grid-cols-2">
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-1 font-semibold text-ink-900">Method</legend>
          {weightMethods.map((m) => (
            <label key={m} className="flex min-h-11 items-center gap-3 rounded-md border border-ink-200 bg-white px-3">
              <input type="radio" name="method" value={m} checked={method === m} onChange={() => setMethod(m)} className="h-5 w-5" />
              <span>
                {methodLabels[m]}
                {m === defaultMethod(batch.product.regulatoryClass) ? <span className="text-ink-600"> (default for a {batch.product.regulatoryClass})</span> : null}
              </span>
            </label>
          ))}
        </fieldset>

        <div className="flex flex-col gap-4">
          <fieldset className="flex flex-col gap-2">
            <legend className="mb-1 font-semibold text-ink-900">Masses weighed</legend>
            {(['net', 'gross'] as const).map((m) => (
              <label key={m} className="flex min-h-11 items-center gap-3 rounded-md border border-ink-200 bg-white px-3">
                <input type="radio" name="massMode" value={m} checked={massMode === m} onChange={() => setMassMode(m)} className="h-5 w-5" />
                <span>{m === 'net' ? 'Net: contents only' : 'Gross: intact capsules (shell mass subtracted)'}</span>
              </label>
            ))}
          </fieldset>
          {massMode === 'gross' ? (
            <div className="flex flex-col gap-1">
              <label htmlFor="shellMassMg" className="font-semibold text-ink-900">
                Mean empty-shell mass (mg)
              </label>
              <p id="shellMassMg-hint" className="text-sm text-ink-600">
                Weigh emptied shells and enter their mean. Ph. Eur. 2.9.5 weighs each unit&apos;s own shell; a mean shell mass is the usual in-process shortcut.
              </p>
              <input
                id="shellMassMg"
                name="shellMassMg"
                inputMode="decimal"
                value={shell}
                onChange={(e) => setShell(e.target.value)}
                aria-invalid={err.shellMassMg ? true : undefined}
                aria-describedby={err.shellMassMg ? 'shellMassMg-hint shellMassMg-error' : 'shellMassMg-hint'}
                className={inputClasses}
              />
              <FieldError id="shellMassMg-error" errors={err.shellMassMg} />
            </div>
          ) : (
            <input type="hidden" name="shellMassMg" value="" />
          )}
          {method === 'usp_905' ? (
            <div className="flex flex-col gap-1">
              <label htmlFor="assayPercent" className="font-semibold text-ink-900">
                Assay (% of label claim)
              </label>
              <p id="assayPercent-hint" className="text-sm text-ink-600">
                USP &lt;905&gt; estimates each unit&apos;s content from its mass and the assay; empty means 100.
              </p>
              <input
                id="assayPercent"
                name="assayPercent"
                inputMode="decimal"
                value={assay}
                onChange={(e) => setAssay(e.target.value)}
                aria-describedby="assayPercent-hint"
                aria-invalid={err.assayPercent ? true : undefined}
                className={inputClasses}
              />
              <FieldError id="assayPercent-error" errors={err.assayPercent} />
            </div>
          ) : null}
        </div>
      </div>

      <div className="flex flex-col gap-1">
        <label htmlFor="masses" className="font-semibold text-ink-900">
          Masses, one per line
        </label>
        <p id="masses-hint" className="text-sm text-ink-600">
          Type or paste from the balance: mg or g (&quot;0.5123 g&quot;), decimal commas are fine. A CSV with a column named mass or weight works too.
        </p>
        <textarea
          id="masses"
          name="masses"
          rows={10}
          value={masses}
          onChange={(e) => setMasses(e.target.value)}
          aria-invalid={err.masses || parsed.errors.length > 0 ? true : undefined}
          aria-describedby={`masses-hint${err.masses ? ' masses-error' : ''}${parsed.errors.length > 0 ? ' masses-lines' : ''}`}
          className={`${inputClasses} font-mono`}
          spellCheck={false}
        />
        <FieldError id="masses-error" errors={err.masses} />
        {parsed.errors.length > 0 ? (
          <ul id="masses-lines" className="text-sm font-semibold text-danger-700">
            {parsed.errors.map((e) => (
              <li key={e.line}>✕ {formatLineError(e)}</li>
            ))}
          </ul>
        ) : null}
        {parsed.notes.map((n) => (
          <p key={n} className="text-sm text-info-700">
            {n}
          </p>
        ))}
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <label htmlFor="csv" className={buttonClasses('secondary', 'cursor-pointer focus-within:outline-3')}>
            Upload a CSV from the balance
          </label>
          <input id="csv" type="file" accept=".csv,.txt,text/csv,text/plain" onChange={readFile} className="sr-only" />
          {fileNote ? <span className="text-sm text-ink-700" role="status">{fileNote}</span> : null}
        </div>
      </div>

      <section aria-labelledby="verdict-heading" className="flex flex-col gap-4" aria-live="polite">
        <h2 id="verdict-heading" className="text-xl font-bold text-ink-900">
          Result
        </h2>
        {evaluation.problems.map((p) => (
          <Notice key={p} tone="warn" live={false}>
            {p}
          </Notice>
        ))}
        {parsed.massesMg.length === 0 ? (
          <p className="text-ink-700">Enter masses to see the verdict.</p>
        ) : evaluation.verdict === 'pass' ? (
          <Notice tone="ok" title="Pass" live={false}>
            Meets {methodLabels[method]} and the product&apos;s limits.
          </Notice>
        ) : evaluation.verdict === 'fail' ? (
          <Notice tone="danger" title="Fail" live={false}>
            Does not meet {methodLabels[method]} or the product&apos;s limits; see the rules below.
          </Notice>
        ) : evaluation.problems.length === 0 ? (
          <Notice tone="neutral" title="No verdict yet" live={false}>
            {evaluation.rules.filter((r) => r.status === 'incomplete').map((r) => r.detail).join(' ')}
          </Notice>
        ) : null}
        {parsed.massesMg.length > 0 && evaluation.problems.length === 0 ? (
          <>
            <SummaryNumbers evaluation={evaluation} />
            <MassChart evaluation={evaluation} limits={limits} />
            <RuleList rules={evaluation.rules} />
          </>
        ) : null}
        {evaluation.hints.length > 0 ? (
          <div className="flex flex-col gap-2 rounded-md border border-warn-700 bg-warn-100 p-4">
            <h3 className="font-semibold text-ink-900">Adjustment hints</h3>
            <ul className="flex list-disc flex-col gap-1 pl-5 text-ink-900">
              {evaluation.hints.map((h) => (
                <li key={h.text} className={h.caution ? 'font-semibold' : undefined}>
                  {h.caution ? 'Caution: ' : ''}
                  {h.text}
                </li>
              ))}
            </ul>
            <p className="text-sm text-ink-700">{hintSource}</p>
          </div>
        ) : null}
        {evaluation.verdict === 'fail' ? (
          <div className="flex flex-col gap-2 rounded-md border border-ink-300 bg-white p-4">
            <a href={raiseHref(batch.lotNumber, evaluation)} className={buttonClasses('secondary', 'self-start')} aria-describedby="deviation-note">
              Raise a deviation
            </a>
            <p id="deviation-note" className="text-sm text-ink-700">
              Opens a new deviation for batch {batch.lotNumber} with the defect and the check&apos;s figures filled in. Record this check
              too, so the deviation can refer to it.
            </p>
          </div>
        ) : null}
      </section>

      <div className="flex flex-col gap-1">
        <label htmlFor="note" className="font-semibold text-ink-900">
          Note (optional)
        </label>
        <textarea id="note" name="note" rows={2} maxLength={1000} defaultValue={v.note ?? ''} className={inputClasses} />
        <FieldError id="note-error" errors={err.note} />
      </div>

      {canRecord ? (
        <div className="flex flex-wrap items-center gap-3">
          <RecordButton ready={ready} />
          {!ready ? <span className="text-sm text-ink-600">Recording is possible once the check has a verdict and every line reads.</span> : null}
        </div>
      ) : (
        <Notice tone="info" live={false}>
          Your role can read weight checks but not record them.
        </Notice>
      )}
    </form>
  );
}

/** The raise form, filled from a failed check: the lot, light or heavy fill, and what the check found. */
function raiseHref(lot: string, evaluation: WeightEvaluation): string {
  const defect = evaluation.direction === 'heavy' ? 'heavy_fill' : evaluation.direction === 'light' ? 'light_fill' : '';
  const failed = evaluation.rules.filter((r) => r.status === 'fail').map((r) => `${r.label} (${r.source}): ${r.detail}`);
  const what = [
    `A ${methodLabels[evaluation.method]} weight check on lot ${lot} failed.`,
    `Average fill ${evaluation.summary.mean.toFixed(1)} mg; ${evaluation.outside.below} below and ${evaluation.outside.above} above the product limits.`,
    ...failed,
  ]
    .join('\n')
    .slice(0, 1800);
  const params = new URLSearchParams({ lot, what });
  if (defect) params.set('defect', defect);
  return `/deviations/new?${params.toString()}`;
}
