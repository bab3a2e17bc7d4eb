'use client';

import dynamic from 'next/dynamic';
import Link from 'next/link';
import { useActionState, useId, useMemo, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import type { CauseBranch } from '@/lib/causes/branches';
import {
  type CauseAnalysis,
  type CauseState,
  type RootCauseCategory,
  type WhyStep,
  causeStateLabels,
  causeStates,
  maxOwnCausesPerBranch,
  maxWhys,
  rootCauseCategories,
  rootCauseCategoryLabels,
} from '@/lib/deviations/investigation-schema';
import type { InvestigationFormState } from './investigation-form-state';
import { idleInvestigationFormState } from './investigation-form-state';

/*
 * The assigned investigator's form: the report (rich text), five whys, the cause-and-effect view on
 * six branches with the probable causes of this defect, the conclusions and the CAPA decision. All
 * of it is held in state and posted in one save; the structured parts travel as JSON in hidden
 * fields, the server validates and cleans everything again.
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

export interface InvestigationFormCause {
  causeId: string | null;
  cause: string;
  check: string | null;
  state: CauseState;
  note: string;
}

export interface InvestigationFormProps {
  action: (previous: InvestigationFormState, formData: FormData) => Promise<InvestigationFormState>;
  deviationId: number;
  version: number;
  defectName: string | null;
  report: string | null;
  fiveWhys: WhyStep[];
  branches: { branch: CauseBranch; label: string; question: string; causes: InvestigationFormCause[] }[];
  cautions: { id: string; text: string }[];
  rootCauseCategory: RootCauseCategory | null;
  rootCause: string | null;
  productImpact: string | null;
  capaRequired: boolean | null;
  capas: { id: number; number: string }[];
}

interface OwnRow {
  key: number;
  branch: CauseBranch;
  cause: string;
  state: CauseState;
  note: string;
}

const stateTone: Record<CauseState, string> = {
  not_assessed: 'peer-checked:bg-ink-700 peer-checked:border-ink-700',
  ruled_out: 'peer-checked:bg-ink-500 peer-checked:border-ink-500',
  contributing: 'peer-checked:bg-warn-700 peer-checked:border-warn-700',
  root_cause: 'peer-checked:bg-danger-700 peer-checked:border-danger-700',
};

function StateRadios({ name, legend, value, onChange }: { name: string; legend: string; value: CauseState; onChange: (s: CauseState) => void }) {
  return (
    <fieldset>
      <legend className="sr-only">{legend}</legend>
      <div className="flex flex-wrap gap-1">
        {causeStates.map((s) => (
          <label key={s} className="relative">
            <input
              type="radio"
              name={name}
              value={s}
              checked={value === s}
              onChange={() => onChange(s)}
              className="peer absolute inset-0 h-full w-full cursor-pointer opacity-0"
            />
            <span
              className={`inline-flex min-h-11 items-center rounded-md border border-ink-300 bg-white px-2 text-sm font-semibold text-ink-900 peer-checked:text-white peer-focus-visible:outline-2 peer-focus-visible:outline-offset-2 peer-focus-visible:outline-focus ${stateTone[s]}`}
            >
              {causeStateLabels[s]}
            </span>
          </label>
        ))}
      </div>
    </fieldset>
  );
}

function FieldError({ id, errors }: { id: string; errors: string[] | undefined }) {
  if (!errors || errors.length === 0) return null;
  return (
    <p id={id} className="flex items-start gap-1 text-sm font-semibold text-danger-700">
      <span aria-hidden="true">✕</span>
      <span>{errors.join(' ')}</span>
    </p>
  );
}

/** Readable text of the report for the copy box (the browser parses; nothing is inserted into the page). */
function htmlToText(html: string): string {
  if (typeof DOMParser === 'undefined') return html;
  const doc = new DOMParser().parseFromString(
    html.replace(/<li[^>]*>/gi, '<li>- ').replace(/<\/(p|h[1-6]|tr|blockquote|pre)>/gi, '</$1>\n').replace(/<\/t[dh]>/gi, '\t'),
    'text/html',
  );
  return (doc.body.textContent ?? '').replace(/\n{3,}/g, '\n\n').trim();
}

export function InvestigationForm(props: InvestigationFormProps) {
  const [state, formAction] = useActionState(props.action, idleInvestigationFormState);
  const uid = useId();
  const [report, setReport] = useState(props.report ?? '');
  const [whys, setWhys] = useState<WhyStep[]>(props.fiveWhys.length > 0 ? props.fiveWhys : [{ why: '', because: '' }]);
  const [marks, setMarks] = useState<Record<string, { state: CauseState; note: string }>>(() =>
    Object.fromEntries(
      props.branches.flatMap((b) => b.causes.filter((c) => c.causeId !== null).map((c) => [c.causeId!, { state: c.state, note: c.note }])),
    ),
  );
  const [own, setOwn] = useState<OwnRow[]>(() =>
    props.branches.flatMap((b, bi) =>
      b.causes.filter((c) => c.causeId === null).map((c, i) => ({ key: bi * 100 + i, branch: b.branch, cause: c.cause, state: c.state, note: c.note })),
    ),
  );
  const [nextKey, setNextKey] = useState(10_000);
  const [drafts, setDrafts] = useState<Partial<Record<CauseBranch, string>>>({});
  const [category, setCategory] = useState<string>(props.rootCauseCategory ?? '');
  const [rootCause, setRootCause] = useState(props.rootCause ?? '');
  const [impact, setImpact] = useState(props.productImpact ?? '');
  const [capa, setCapa] = useState<'' | 'yes' | 'no'>(props.capaRequired === null ? '' : props.capaRequired ? 'yes' : 'no');

  const catalogueText = useMemo(
    () => new Map(props.branches.flatMap((b) => b.causes.filter((c) => c.causeId !== null).map((c) => [c.causeId!, { cause: c.cause, branch: b.label }]))),
    [props.branches],
  );
  const branchLabel = (b: CauseBranch) => props.branches.find((x) => x.branch === b)?.label ?? b;

  const analysis: CauseAnalysis = {
    catalogue: Object.entries(marks)
      .filter(([, m]) => m.state !== 'not_assessed' || m.note.trim() !== '')
      .map(([causeId, m]) => ({ causeId, state: m.state, note: m.note })),
    own: own.map(({ branch, cause, state: s, note }) => ({ branch, cause, state: s, note })),
  };
  const summary = [
    ...analysis.catalogue.map((m) => ({ state: m.state, cause: catalogueText.get(m.causeId)?.cause ?? m.causeId, branch: catalogueText.get(m.causeId)?.branch ?? '' })),
    ...analysis.own.map((o) => ({ state: o.state, cause: o.cause, branch: branchLabel(o.branch) })),
  ].filter((c) => c.state === 'root_cause' || c.state === 'contributing');

  const errors = state.fieldErrors;
  const copyText = state.conflict
    ? [
        `Report:\n${htmlToText(report)}`,
        `Five whys:\n${whys.filter((w) => w.why || w.because).map((w, i) => `${i + 1}. ${w.why} → ${w.because}`).join('\n')}`,
        `Root-cause category: ${category ? rootCauseCategoryLabels[category as RootCauseCategory] : ''}`,
        `Root cause:\n${rootCause}`,
        `Product impact:\n${impact}`,
        `CAPA needed: ${capa}`,
      ].join('\n\n')
    : '';

  const addOwn = (branch: CauseBranch) => {
    const text = (drafts[branch] ?? '').trim();
    if (text === '') return;
    setOwn((rows) => [...rows, { key: nextKey, branch, cause: text, state: 'contributing', note: '' }]);
    setNextKey((k) => k + 1);
    setDrafts((d) => ({ ...d, [branch]: '' }));
  };

  return (
    <form action={formAction} className="mt-4 flex flex-col gap-6" noValidate>
      {state.failed && state.message ? (
        <Notice tone="danger" title={state.conflict ? 'Changed by someone else — your text is below to copy' : state.message}>
          {state.conflict ? (
            <>
              <p>{state.message}</p>
              <label htmlFor={`${uid}-copy`} className="mt-2 block font-semibold">
                Your text
              </label>
              <textarea
                id={`${uid}-copy`}
                readOnly
                value={copyText}
                rows={8}
                className="mt-1 block w-full rounded-md border border-ink-400 bg-white px-3 py-2 font-mono text-sm"
                onFocus={(e) => e.currentTarget.select()}
              />
              <p className="mt-2">
                Copy it, then{' '}
                <a href={`/deviations/${props.deviationId}#investigation-heading`} className="font-semibold underline underline-offset-4">
                  reload the deviation
                </a>{' '}
                to see the saved version and add your changes to it.
              </p>
            </>
          ) : null}
        </Notice>
      ) : null}
      <input type="hidden" name="id" value={props.deviationId} />
      <input type="hidden" name="version" value={props.version} />
      <input type="hidden" name="fiveWhys" value={JSON.stringify(whys)} />
      <input type="hidden" name="causeAnalysis" value={JSON.stringify(analysis)} />

      <div className="flex flex-col gap-1">
        <p id={`${uid}-report-label`} className="font-semibold text-ink-900">
          Investigation report
        </p>
        <p id={`${uid}-report-hint`} className="text-sm text-ink-600">
          What was examined, what was found and how you concluded. Headings, lists, tables and links are kept; anything else is removed when saved.
        </p>
        <RichTextEditor
          name="investigationReport"
          labelledBy={`${uid}-report-label`}
          describedBy={[`${uid}-report-hint`, errors.investigationReport ? `${uid}-report-error` : null].filter(Boolean).join(' ')}
          initialHtml={report}
          invalid={Boolean(errors.investigationReport)}
          onChange={setReport}
        />
        <FieldError id={`${uid}-report-error`} errors={errors.investigationReport} />
      </div>

      <fieldset className="flex flex-col gap-3">
        <legend className="font-semibold text-ink-900">Five whys</legend>
        <p className="text-sm text-ink-600">Ask why until you reach a cause you can act on; up to {maxWhys} steps.</p>
        <ol className="flex flex-col gap-3">
          {whys.map((w, i) => (
            <li key={i} className="grid grid-cols-1 gap-2 rounded-md border border-ink-200 p-3 md:grid-cols-[auto_minmax(0,1fr)_minmax(0,1fr)_auto] md:items-end">
              <span className="font-semibold text-ink-700 md:pb-3" aria-hidden="true">
                {i + 1}.
              </span>
              <div className="flex flex-col gap-1">
                <label htmlFor={`${uid}-why-${i}`} className="text-sm font-semibold">
                  Why {i + 1}?
                </label>
                <input
                  id={`${uid}-why-${i}`}
                  value={w.why}
                  onChange={(e) => setWhys((rows) => rows.map((r, j) => (j === i ? { ...r, why: e.target.value } : r)))}
                  className="min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2"
                  maxLength={1000}
                />
              </div>
              <div className="flex flex-col gap-1">
                <label htmlFor={`${uid}-because-${i}`} className="text-sm font-semibold">
                  Because
                </label>
                <input
                  id={`${uid}-because-${i}`}
                  value={w.because}
                  onChange={(e) => setWhys((rows) => rows.map((r, j) => (j === i ? { ...r, because: e.target.value } : r)))}
                  className="min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2"
                  maxLength={1000}
                />
              </div>
              <Button
                variant="quiet"
                aria-label={`Remove why ${i + 1}`}
                disabled={whys.length === 1 && w.why === '' && w.because === ''}
                onClick={() => setWhys((rows) => (rows.length === 1 ? [{ why: '', because: '' }] : rows.filter((_, j) => j !== i)))}
              >
                Remove
              </Button>
            </li>
          ))}
        </ol>
        <div>
          <Button variant="secondary" disabled={whys.length >= maxWhys} onClick={() => setWhys((rows) => [...rows, { why: '', because: '' }])}>
            Add a why
          </Button>
          {whys.length >= maxWhys ? <span className="ml-3 text-sm text-ink-600">Five is the most.</span> : null}
        </div>
        <FieldError id={`${uid}-whys-error`} errors={errors.fiveWhys} />
      </fieldset>

      <fieldset className="flex flex-col gap-3">
        <legend className="font-semibold text-ink-900">Cause and effect</legend>
        <p className="text-sm text-ink-600">
          The probable causes of {props.defectName ? <strong>{props.defectName.toLowerCase()}</strong> : 'this defect'} on six branches. Mark what you
          ruled out, what contributed and the root cause; add causes of your own on any branch.
        </p>
        {props.cautions.map((c) => (
          <Notice key={c.id} tone="warn" title="Caution" live={false}>
            {c.text}
          </Notice>
        ))}
        <div className="grid grid-cols-1 gap-3 md:grid-cols-2">
          {props.branches.map((b) => {
            const mine = own.filter((o) => o.branch === b.branch);
            const catalogue = b.causes.filter((c) => c.causeId !== null);
            return (
              <section key={b.branch} aria-labelledby={`${uid}-branch-${b.branch}`} className="flex flex-col gap-3 rounded-md border border-ink-200 bg-ink-50 p-3">
                <div>
                  <h4 id={`${uid}-branch-${b.branch}`} className="font-semibold">
                    {b.label}
                  </h4>
                  <p className="text-sm text-ink-600">{b.question}</p>
                </div>
                {catalogue.length === 0 && mine.length === 0 ? <p className="text-sm text-ink-700">No probable causes listed for this defect.</p> : null}
                {catalogue.map((c) => {
                  const mark = marks[c.causeId!] ?? { state: 'not_assessed' as const, note: '' };
                  return (
                    <div key={c.causeId} className="flex flex-col gap-2 rounded-md border border-ink-200 bg-white p-2">
                      <p className="font-medium">{c.cause}</p>
                      {c.check ? <p className="text-sm text-ink-600">Check: {c.check}</p> : null}
                      <StateRadios
                        name={`cause-${c.causeId}`}
                        legend={`Conclusion on: ${c.cause}`}
                        value={mark.state}
                        onChange={(s) => setMarks((m) => ({ ...m, [c.causeId!]: { ...mark, state: s } }))}
                      />
                      <label className="flex flex-col gap-1 text-sm font-semibold">
                        Note
                        <input
                          value={mark.note}
                          maxLength={2000}
                          onChange={(e) => setMarks((m) => ({ ...m, [c.causeId!]: { ...mark, note: e.target.value } }))}
                          className="min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base font-normal"
                        />
                      </label>
                    </div>
                  );
                })}
                {mine.map((o) => (
                  <div key={o.key} className="flex flex-col gap-2 rounded-md border border-dashed border-ink-400 bg-white p-2">
                    <p className="font-medium">
                      {o.cause} <span className="text-sm font-normal text-ink-600">(added by you)</span>
                    </p>
                    <StateRadios
                      name={`own-${o.key}`}
                      legend={`Conclusion on: ${o.cause}`}
                      value={o.state}
                      onChange={(s) => setOwn((rows) => rows.map((r) => (r.key === o.key ? { ...r, state: s } : r)))}
                    />
                    <label className="flex flex-col gap-1 text-sm font-semibold">
                      Note
                      <input
                        value={o.note}
                        maxLength={2000}
                        onChange={(e) => setOwn((rows) => rows.map((r) => (r.key === o.key ? { ...r, note: e.target.value } : r)))}
                        className="min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base font-normal"
                      />
                    </label>
                    <div>
                      <Button variant="quiet" onClick={() => setOwn((rows) => rows.filter((r) => r.key !== o.key))}>
                        Remove this cause
                      </Button>
                    </div>
                  </div>
                ))}
                {mine.length < maxOwnCausesPerBranch ? (
                  <div className="flex flex-wrap items-end gap-2">
                    <label className="flex min-w-0 flex-1 flex-col gap-1 text-sm font-semibold">
                      Add a cause on {b.label.toLowerCase()}
                      <input
                        value={drafts[b.branch] ?? ''}
                        maxLength={500}
                        onChange={(e) => setDrafts((d) => ({ ...d, [b.branch]: e.target.value }))}
                        onKeyDown={(e) => {
                          if (e.key === 'Enter') {
                            e.preventDefault();
                            addOwn(b.branch);
                          }
                        }}
                        className="min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base font-normal"
                      />
                    </label>
                    <Button variant="secondary" onClick={() => addOwn(b.branch)} disabled={(drafts[b.branch] ?? '').trim() === ''}>
                      Add
                    </Button>
                  </div>
                ) : null}
              </section>
            );
          })}
        </div>
        <div className="rounded-md border border-ink-200 p-3" aria-live="polite">
          <p className="font-semibold">Marked so far</p>
          {summary.length === 0 ? (
            <p className="text-ink-700">No cause marked as root cause or contributing yet.</p>
          ) : (
            <ul className="mt-1 list-disc pl-6">
              {summary.map((c, i) => (
                <li key={i}>
                  <strong>{causeStateLabels[c.state]}</strong> ({c.branch}): {c.cause}
                </li>
              ))}
            </ul>
          )}
        </div>
        <FieldError id={`${uid}-causes-error`} errors={errors.causeAnalysis} />
      </fieldset>

      <div className="grid grid-cols-1 gap-4">
        <div className="flex flex-col gap-1">
          <label htmlFor={`${uid}-category`} className="font-semibold">
            Root-cause category
          </label>
          <select
            id={`${uid}-category`}
            name="rootCauseCategory"
            value={category}
            onChange={(e) => setCategory(e.target.value)}
            aria-invalid={errors.rootCauseCategory ? true : undefined}
            aria-describedby={errors.rootCauseCategory ? `${uid}-category-error` : undefined}
            className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700 md:max-w-md"
          >
            <option value="">Not chosen yet</option>
            {rootCauseCategories.map((c) => (
              <option key={c} value={c}>
                {rootCauseCategoryLabels[c]}
              </option>
            ))}
          </select>
          <FieldError id={`${uid}-category-error`} errors={errors.rootCauseCategory} />
        </div>
        <TextArea id={`${uid}-root`} name="rootCause" label="Root cause" hint="The cause that, removed, stops the defect coming back — or why none could be found." value={rootCause} onChange={setRootCause} errors={errors.rootCause} />
        <TextArea id={`${uid}-impact`} name="productImpact" label="Product impact" hint="What this means for the batches concerned: capsules removed, tests passed, what remains at risk." value={impact} onChange={setImpact} errors={errors.productImpact} />
        <fieldset className="flex flex-col gap-2" aria-describedby={`${uid}-capa-hint${errors.capaRequired ? ` ${uid}-capa-error` : ''}`}>
          <legend className="font-semibold">CAPA needed?</legend>
          <p id={`${uid}-capa-hint`} className="text-sm text-ink-600">
            Yes opens a CAPA in state proposed, linked to this deviation, when you save. Switching back to no later does not delete it: a CAPA is
            never deleted; its owner cancels it with a reason.
          </p>
          <div className="flex flex-wrap gap-2">
            {(['yes', 'no'] as const).map((v) => (
              <label key={v} className="inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-md border border-ink-300 bg-white px-3">
                <input type="radio" name="capaRequired" value={v} checked={capa === v} onChange={() => setCapa(v)} className="h-5 w-5" />
                {v === 'yes' ? 'Yes, a CAPA is needed' : 'No CAPA needed'}
              </label>
            ))}
          </div>
          {props.capas.length > 0 ? (
            <p className="text-sm">
              Raised by this deviation:{' '}
              {props.capas.map((c, i) => (
                <span key={c.id}>
                  {i > 0 ? ', ' : null}
                  <Link href={`/capa/${c.id}`} className="font-semibold underline underline-offset-4">
                    {c.number}
                  </Link>
                </span>
              ))}
            </p>
          ) : null}
          <FieldError id={`${uid}-capa-error`} errors={errors.capaRequired} />
        </fieldset>
      </div>

      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton pendingLabel="Saving…">Save the investigation</SubmitButton>
        <p className="text-sm text-ink-600">Save as often as you like; each save is kept in the audit trail. Sign it off under “What you can do”.</p>
      </div>
    </form>
  );
}

function TextArea({
  id,
  name,
  label,
  hint,
  value,
  onChange,
  errors,
}: {
  id: string;
  name: string;
  label: string;
  hint: string;
  value: string;
  onChange: (v: string) => void;
  errors: string[] | undefined;
}) {
  const invalid = Boolean(errors && errors.length > 0);
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-semibold">
        {label}
      </label>
      <p id={`${id}-hint`} className="text-sm text-ink-600">
        {hint}
      </p>
      <textarea
        id={id}
        name={name}
        value={value}
        rows={3}
        maxLength={10_000}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={invalid ? true : undefined}
        aria-describedby={`${id}-hint${invalid ? ` ${id}-error` : ''}`}
        className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
      />
      <FieldError id={`${id}-error`} errors={errors} />
    </div>
  );
}
