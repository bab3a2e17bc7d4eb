'use client';

import Link from 'next/link';
import { type ReactNode, useEffect, useRef, useState } from 'react';
import { EvidenceDropzone } from '@/components/evidence/evidence-dropzone';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import type { ActionResult } from '@/lib/define-action';
import type { RaiseBatchOption, RaiseDefectOption, RaiseMachineOption, RaiseRingOption } from '@/lib/deviations/raise-options';

/*
 * Raising a deviation on the line in three steps. Everything typed lives in this component and in
 * localStorage (keyed by the draft id once the server has one), so a dropped connection, a refused
 * save or a reload on the tablet loses nothing. Each "Next" saves the draft; Submit reports it.
 */

type Step = 1 | 2 | 3;

export interface RaiseFormState {
  id: number | null;
  version: number | null;
  step: Step;
  lot: string;
  batch: RaiseBatchOption | null;
  machineId: string;
  ringId: string;
  defectId: string;
  title: string;
  whatHappened: string;
  affectedCount: string;
  sampleDescription: string;
  /** datetime-local value, the tablet's local time. */
  occurredAt: string;
  lineStopped: boolean;
  capsulesSegregated: boolean;
  heldBatchIds: number[];
  immediateActions: string;
}

type Errors = Record<string, string[]>;

export interface RaiseFormProps {
  defects: RaiseDefectOption[];
  machines: RaiseMachineOption[];
  rings: RaiseRingOption[];
  recentBatches: RaiseBatchOption[];
  saveDraft: (values: Record<string, unknown>) => Promise<ActionResult<{ id: number; version: number }>>;
  submit: (values: { id: number; version: number }) => Promise<ActionResult<{ id: number; number: string }>>;
  findLots: (term: string) => Promise<ActionResult<RaiseBatchOption[]>>;
  findHoldCandidates: (batchId: number) => Promise<ActionResult<RaiseBatchOption[]>>;
  /** A new deviation started from elsewhere (a failed weight check); a draft kept on the tablet wins. */
  prefill?: { batch: RaiseBatchOption | null; defectId: number | null; whatHappened: string } | null;
}

const storageKey = (id: number | null) => `plumbline.raise.${id ?? 'new'}`;
const stepOfField: Record<string, Step> = {
  batchId: 1, lot: 1, machineId: 1, ringId: 1, defectId: 1,
  title: 2, whatHappened: 2, affectedCount: 2, sampleDescription: 2, occurredAt: 2,
  lineStopped: 3, capsulesSegregated: 3, heldBatchIds: 3, immediateActions: 3,
};
const stepTitles: Record<Step, string> = { 1: 'What and where', 2: 'What happened', 3: 'What was done at once' };
const offline = 'The tablet could not reach the server. Everything you typed is kept here; try again when the connection is back.';

function localNow(): string {
  const d = new Date();
  d.setSeconds(0, 0);
  return new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
}

function emptyState(): RaiseFormState {
  return {
    id: null, version: null, step: 1, lot: '', batch: null, machineId: '', ringId: '', defectId: '',
    title: '', whatHappened: '', affectedCount: '', sampleDescription: '', occurredAt: localNow(),
    lineStopped: false, capsulesSegregated: false, heldBatchIds: [], immediateActions: '',
  };
}

function batchLine(b: RaiseBatchOption): string {
  return `${b.productName} ${b.productStrength} · ${b.machineName ?? 'no filler recorded'} · ring ${b.ringSerial ?? '—'}`;
}

export function RaiseForm(props: RaiseFormProps) {
  const { defects, machines, rings } = props;
  const [form, setForm] = useState<RaiseFormState>(emptyState);
  const [errors, setErrors] = useState<Errors>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [lotOptions, setLotOptions] = useState<RaiseBatchOption[]>(props.recentBatches);
  const [holdOptions, setHoldOptions] = useState<RaiseBatchOption[]>([]);
  const [done, setDone] = useState<{ id: number; number: string } | null>(null);
  const [restored, setRestored] = useState(false);
  const heading = useRef<HTMLHeadingElement>(null);

  // Restore after mount (localStorage is not there on the server): the draft named in the URL, else an unsaved one.
  useEffect(() => {
    const draft = Number(new URLSearchParams(window.location.search).get('draft')) || null;
    const saved = window.localStorage.getItem(storageKey(draft));
    if (saved) {
      try {
        const kept = JSON.parse(saved) as Partial<RaiseFormState>;
        // An untouched form is saved too (the effect below runs on mount): only announce real work put back.
        if (kept.id || kept.lot || kept.defectId || kept.title || kept.whatHappened) {
          setForm({ ...emptyState(), ...kept });
          setRestored(true);
          return;
        }
      } catch {
        window.localStorage.removeItem(storageKey(draft));
      }
    }
    const p = props.prefill;
    if (!draft && p) {
      setForm((f) => ({
        ...f,
        ...(p.batch
          ? { batch: p.batch, lot: p.batch.lotNumber, machineId: p.batch.machineId ? String(p.batch.machineId) : '', ringId: p.batch.ringId ? String(p.batch.ringId) : '' }
          : {}),
        ...(p.defectId ? { defectId: String(p.defectId) } : {}),
        whatHappened: p.whatHappened,
      }));
    }
    // Runs once on mount: the prefill is the page's first render, never a later change.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  useEffect(() => {
    if (!done) window.localStorage.setItem(storageKey(form.id), JSON.stringify(form));
  }, [form, done]);

  const batchId = form.batch?.id ?? null;
  useEffect(() => {
    if (batchId === null) return setHoldOptions([]);
    let live = true;
    props
      .findHoldCandidates(batchId)
      .then((r) => live && setHoldOptions(r.ok ? r.data : []))
      .catch(() => live && setHoldOptions([]));
    return () => {
      live = false;
    };
  }, [batchId, props]);

  const clearError = (...keys: string[]) =>
    setErrors((e) => (keys.some((k) => k in e) ? Object.fromEntries(Object.entries(e).filter(([k]) => !keys.includes(k))) : e));
  const set = <K extends keyof RaiseFormState>(key: K, value: RaiseFormState[K]) => {
    setForm((f) => ({ ...f, [key]: value }));
    clearError(key);
  };

  function chooseBatch(b: RaiseBatchOption | null, lot: string) {
    if (b) clearError('lot', 'batchId');
    setForm((f) => ({
      ...f,
      lot,
      batch: b,
      machineId: b?.machineId ? String(b.machineId) : f.machineId,
      ringId: b?.ringId ? String(b.ringId) : f.ringId,
      heldBatchIds: b ? (f.batch?.id === b.id ? f.heldBatchIds : [b.id]) : [],
    }));
  }

  async function onLotChange(value: string) {
    const exact = lotOptions.find((o) => o.lotNumber.toUpperCase() === value.trim().toUpperCase()) ?? null;
    chooseBatch(exact, value);
    try {
      const found = await props.findLots(value);
      if (!found.ok) return;
      setLotOptions(found.data);
      if (!exact) {
        const match = found.data.find((o) => o.lotNumber.toUpperCase() === value.trim().toUpperCase());
        if (match) chooseBatch(match, value);
      }
    } catch {
      // A failed lookup leaves the list as it was; the operator can keep typing the full lot.
    }
  }

  const defect = defects.find((d) => String(d.id) === form.defectId) ?? null;

  function payload(f: RaiseFormState): Record<string, unknown> {
    const occurred = new Date(f.occurredAt);
    const facts = defect && f.batch ? `${defect.name} on lot ${f.batch.lotNumber}` : '';
    return {
      ...(f.id ? { id: f.id, version: f.version } : {}),
      batchId: f.batch?.id ?? '',
      machineId: f.machineId,
      ringId: f.ringId,
      defectId: f.defectId,
      // The draft needs a title and a sentence from the first save; both start as the facts picked in step 1 and are edited in step 2.
      title: f.title || facts,
      whatHappened: f.whatHappened || (facts ? `${facts}: found on the line, details being written.` : ''),
      affectedCount: f.affectedCount,
      sampleDescription: f.sampleDescription,
      occurredAt: Number.isNaN(occurred.getTime()) ? '' : occurred.toISOString(),
      lineStopped: f.lineStopped,
      capsulesSegregated: f.capsulesSegregated,
      heldBatchIds: f.heldBatchIds,
      immediateActions: f.immediateActions,
    };
  }

  function localCheck(step: Step): Errors {
    const e: Errors = {};
    if (step === 1) {
      if (!form.batch) e.lot = ['Type or scan a lot number from the list (batches in process or on hold).'];
      if (!form.defectId) e.defectId = ['Pick the defect you saw.'];
    }
    if (step === 2 && !form.occurredAt) e.occurredAt = ['Enter when it happened.'];
    return e;
  }

  function fail(result: { message: string; fieldErrors: Errors }) {
    setErrors(result.fieldErrors);
    setMessage(result.message);
    const first = Object.keys(result.fieldErrors).map((k) => stepOfField[k]).filter((s): s is Step => s !== undefined);
    if (first.length > 0) set('step', Math.min(...first) as Step);
  }

  async function save(): Promise<RaiseFormState | null> {
    const body = payload(form);
    const result = await props.saveDraft(body);
    if (!result.ok) {
      fail(result);
      return null;
    }
    const next = { ...form, id: result.data.id, version: result.data.version, title: String(body.title), whatHappened: String(body.whatHappened) };
    if (form.id === null) {
      window.localStorage.removeItem(storageKey(null));
      window.history.replaceState(null, '', `?draft=${result.data.id}`);
    }
    return next;
  }

  async function next() {
    const local = localCheck(form.step);
    if (Object.keys(local).length > 0) {
      setErrors(local);
      setMessage('Some answers need a look before going on.');
      return;
    }
    setBusy(true);
    setErrors({});
    setMessage(null);
    setRestored(false);
    try {
      const saved = await save();
      if (saved) {
        setForm({ ...saved, step: (form.step + 1) as Step });
        heading.current?.focus();
      }
    } catch {
      setMessage(offline);
    } finally {
      setBusy(false);
    }
  }

  async function submit() {
    setBusy(true);
    setErrors({});
    setMessage(null);
    try {
      const saved = await save();
      if (!saved || saved.id === null || saved.version === null) return;
      setForm(saved);
      const result = await props.submit({ id: saved.id, version: saved.version });
      if (!result.ok) return fail(result);
      window.localStorage.removeItem(storageKey(saved.id));
      setDone(result.data);
    } catch {
      setMessage(offline);
    } finally {
      setBusy(false);
    }
  }

  if (done) {
    return (
      <div className="flex max-w-2xl flex-col gap-4">
        <Notice tone="ok" title={`Deviation ${done.number} reported`}>
          QA has it now. The batches you ticked are on hold.
        </Notice>
        <p className="flex flex-wrap gap-3">
          <Link href={`/deviations/${done.id}`} className="inline-flex min-h-11 items-center rounded-md bg-ink-900 px-4 font-semibold text-white">
            Open {done.number}
          </Link>
          <a href="/deviations/new" className="inline-flex min-h-11 items-center rounded-md border border-ink-400 px-4 font-semibold">
            Raise another
          </a>
        </p>
      </div>
    );
  }

  const ringsForMachine = rings.filter((r) => !form.machineId || String(r.machineId) === form.machineId);
  const holdList = [...(form.batch ? [form.batch] : []), ...holdOptions];

  return (
    <form
      noValidate
      className="flex max-w-3xl flex-col gap-6"
      onSubmit={(e) => {
        e.preventDefault();
        void (form.step === 3 ? submit() : next());
      }}
    >
      <ol className="grid grid-cols-3 gap-2" aria-label="Steps">
        {([1, 2, 3] as const).map((s) => (
          <li
            key={s}
            aria-current={s === form.step ? 'step' : undefined}
            className={`rounded-md border px-3 py-2 text-sm ${s === form.step ? 'border-ink-900 bg-ink-900 text-white' : s < form.step ? 'border-ink-400 bg-ink-100' : 'border-ink-200 text-ink-600'}`}
          >
            <span className="block font-semibold">Step {s} of 3</span>
            {stepTitles[s]}
          </li>
        ))}
      </ol>

      <h2 ref={heading} tabIndex={-1} className="text-xl font-bold text-ink-900">
        {stepTitles[form.step]}
        {form.id ? <span className="ml-2 text-sm font-normal text-ink-600">Draft saved (version {form.version})</span> : null}
      </h2>

      {restored ? <Notice tone="info">What you typed earlier on this tablet has been put back.</Notice> : null}
      {message ? <Notice tone="danger" title="Not saved yet">{message}</Notice> : null}

      {form.step === 1 ? (
        <>
          <TextField
            name="lot"
            label="Lot number"
            hint="Type the first characters or scan the batch label. Only batches in process or on hold are listed."
            list="raise-lots"
            autoComplete="off"
            autoCapitalize="characters"
            inputMode="text"
            required
            value={form.lot}
            errors={errors.lot ?? errors.batchId}
            onChange={(e) => void onLotChange(e.target.value)}
          />
          <datalist id="raise-lots">
            {lotOptions.map((o) => (
              <option key={o.id} value={o.lotNumber}>
                {batchLine(o)}
              </option>
            ))}
          </datalist>
          {form.batch ? (
            <dl className="grid grid-cols-1 gap-x-6 gap-y-1 rounded-md border border-ink-200 bg-ink-50 px-4 py-3 sm:grid-cols-3" aria-label="The batch">
              <Fact term="Product">{`${form.batch.productName} ${form.batch.productStrength}`}</Fact>
              <Fact term="Filler">{form.batch.machineName ?? 'not recorded'}</Fact>
              <Fact term="Ring">{form.batch.ringSerial ?? 'not recorded'}</Fact>
              <Fact term="Status">{form.batch.status === 'on_hold' ? 'On hold' : 'In process'}</Fact>
              <Fact term="Made on">{form.batch.manufacturedOn}</Fact>
            </dl>
          ) : null}
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
            <Select
              name="machineId"
              label="Filler"
              value={form.machineId}
              errors={errors.machineId}
              onChange={(v) => setForm((f) => ({ ...f, machineId: v, ringId: rings.some((r) => String(r.id) === f.ringId && String(r.machineId) === v) ? f.ringId : '' }))}
              options={machines.map((m) => ({ value: String(m.id), label: m.label }))}
            />
            <Select
              name="ringId"
              label="Filling ring"
              value={form.ringId}
              errors={errors.ringId}
              onChange={(v) => set('ringId', v)}
              options={ringsForMachine.map((r) => ({ value: String(r.id), label: `${r.serial} (size ${r.capsuleSize})` }))}
            />
          </div>
          <fieldset aria-describedby={errors.defectId ? 'defect-error' : undefined}>
            <legend className="mb-2 font-semibold text-ink-900">Defect seen <span className="font-normal text-ink-600">(required)</span></legend>
            <div className="grid grid-cols-1 gap-2 sm:grid-cols-2">
              {defects.map((d) => (
                <label
                  key={d.id}
                  className="flex min-h-14 cursor-pointer items-start gap-3 rounded-md border border-ink-300 bg-white px-3 py-3 has-[:checked]:border-2 has-[:checked]:border-ink-900 has-[:checked]:bg-brass-50 has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-focus"
                >
                  <input
                    type="radio"
                    name="defectId"
                    value={d.id}
                    checked={form.defectId === String(d.id)}
                    onChange={() => set('defectId', String(d.id))}
                    className="mt-1 h-5 w-5 shrink-0"
                  />
                  <span className="flex flex-col">
                    <span className="font-semibold">{d.name}</span>
                    <span className="text-sm text-ink-600">
                      {d.defaultClassification === 'critical' ? 'Critical' : d.defaultClassification === 'major' ? 'Major' : 'Minor'} by default · severity {d.defaultSeverity}
                    </span>
                  </span>
                </label>
              ))}
            </div>
            {errors.defectId ? (
              <p id="defect-error" className="mt-1 text-sm font-semibold text-danger-700">✕ {errors.defectId.join(' ')}</p>
            ) : null}
          </fieldset>
          {defect ? (
            <Notice tone={defect.defaultClassification === 'critical' ? 'danger' : 'info'} title={defect.defaultClassification === 'critical' ? 'Critical defect: quarantine' : defect.name}>
              <p>{defect.caution ?? defect.description}</p>
            </Notice>
          ) : null}
        </>
      ) : null}

      {form.step === 2 ? (
        <>
          <TextField name="title" label="Title" hint="A few words: what and where." required value={form.title} errors={errors.title} onChange={(e) => set('title', e.target.value)} />
          <TextArea name="whatHappened" label="What happened" hint="In plain words: what you saw, where, when you noticed." rows={5} value={form.whatHappened} errors={errors.whatHappened} onChange={(v) => set('whatHappened', v)} required />
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
            <TextField name="affectedCount" label="How many capsules" inputMode="numeric" value={form.affectedCount} errors={errors.affectedCount} onChange={(e) => set('affectedCount', e.target.value)} />
            <TextField name="sampleDescription" label="Which sample" hint="e.g. IPC sample 10:00, outfeed chute" value={form.sampleDescription} errors={errors.sampleDescription} onChange={(e) => set('sampleDescription', e.target.value)} />
          </div>
          <TextField name="occurredAt" type="datetime-local" label="When it happened" hint="Set to now; change it if you saw it earlier." required value={form.occurredAt} errors={errors.occurredAt} onChange={(e) => set('occurredAt', e.target.value)} />
          {form.id ? (
            <section aria-labelledby="raise-photos-heading" className="flex flex-col gap-2">
              <h3 id="raise-photos-heading" className="font-semibold text-ink-900">
                Photos and files <span className="font-normal text-ink-600">(optional)</span>
              </h3>
              <EvidenceDropzone
                uploadUrl={`/api/deviations/${form.id}/attachments`}
                hint="Each one is attached to this draft as soon as it is sent; QA sees them once you submit."
                // A photo gives the draft a new version; the next save or the submission sends that one.
                onUploaded={(a) => setForm((f) => (f.id === a.recordId ? { ...f, version: a.recordVersion } : f))}
              />
            </section>
          ) : null}
        </>
      ) : null}

      {form.step === 3 ? (
        <>
          <fieldset className="flex flex-col gap-2">
            <legend className="mb-2 font-semibold text-ink-900">Done at once</legend>
            <Check label="Line stopped" checked={form.lineStopped} onChange={(v) => set('lineStopped', v)} />
            <Check label="Capsules segregated" checked={form.capsulesSegregated} onChange={(v) => set('capsulesSegregated', v)} />
          </fieldset>
          <fieldset className="flex flex-col gap-2" aria-describedby={errors.heldBatchIds ? 'held-error' : undefined}>
            <legend className="mb-1 font-semibold text-ink-900">Batches to put on hold</legend>
            <p className="text-sm text-ink-600">The batch you named, and other batches filled on the same filler in the last 7 days.</p>
            {holdList.map((b) => (
              <Check
                key={b.id}
                label={`${b.lotNumber}${b.id === form.batch?.id ? ' (this batch)' : ''}`}
                detail={`${batchLine(b)} · made ${b.manufacturedOn}${b.status === 'on_hold' ? ' · already on hold' : ''}`}
                checked={form.heldBatchIds.includes(b.id)}
                onChange={(v) => set('heldBatchIds', v ? [...form.heldBatchIds, b.id] : form.heldBatchIds.filter((x) => x !== b.id))}
              />
            ))}
            {errors.heldBatchIds ? <p id="held-error" className="text-sm font-semibold text-danger-700">✕ {errors.heldBatchIds.join(' ')}</p> : null}
          </fieldset>
          <TextArea name="immediateActions" label="Other actions taken at once" rows={3} value={form.immediateActions} errors={errors.immediateActions} onChange={(v) => set('immediateActions', v)} />
        </>
      ) : null}

      <div className="flex flex-wrap gap-3 border-t border-ink-200 pt-4">
        {form.step > 1 ? (
          <Button variant="secondary" disabled={busy} onClick={() => set('step', (form.step - 1) as Step)}>
            Back
          </Button>
        ) : null}
        <Button type="submit" disabled={busy} className="min-w-40">
          {busy ? 'Saving…' : form.step === 3 ? 'Submit the deviation' : 'Save and go on'}
        </Button>
      </div>
    </form>
  );
}

function Fact({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div>
      <dt className="text-sm text-ink-600">{term}</dt>
      <dd className="font-semibold">{children}</dd>
    </div>
  );
}

function Check({ label, detail, checked, onChange }: { label: string; detail?: string; checked: boolean; onChange: (v: boolean) => void }) {
  return (
    <label className="flex min-h-11 cursor-pointer items-start gap-3 rounded-md border border-ink-300 bg-white px-3 py-2 has-[:checked]:border-ink-900">
      <input type="checkbox" checked={checked} onChange={(e) => onChange(e.target.checked)} className="mt-1 h-5 w-5 shrink-0" />
      <span className="flex flex-col">
        <span className="font-semibold">{label}</span>
        {detail ? <span className="text-sm text-ink-600">{detail}</span> : null}
      </span>
    </label>
  );
}

function Select(p: { name: string; label: string; value: string; options: { value: string; label: string }[]; errors?: string[] | undefined; onChange: (v: string) => void }) {
  const id = `field-${p.name}`;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-semibold text-ink-900">{p.label}</label>
      <select
        id={id}
        value={p.value}
        aria-invalid={p.errors ? true : undefined}
        aria-describedby={p.errors ? `${id}-error` : undefined}
        onChange={(e) => p.onChange(e.target.value)}
        className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base"
      >
        <option value="">— not known —</option>
        {p.options.map((o) => (
          <option key={o.value} value={o.value}>{o.label}</option>
        ))}
      </select>
      {p.errors ? <p id={`${id}-error`} className="text-sm font-semibold text-danger-700">✕ {p.errors.join(' ')}</p> : null}
    </div>
  );
}

function TextArea(p: { name: string; label: string; hint?: string; rows: number; value: string; required?: boolean; errors?: string[] | undefined; onChange: (v: string) => void }) {
  const id = `field-${p.name}`;
  const described = [p.hint ? `${id}-hint` : null, p.errors ? `${id}-error` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-semibold text-ink-900">
        {p.label} {p.required ? <span aria-hidden="true" className="font-normal text-ink-600">(required)</span> : null}
      </label>
      {p.hint ? <p id={`${id}-hint`} className="text-sm text-ink-600">{p.hint}</p> : null}
      <textarea
        id={id}
        rows={p.rows}
        value={p.value}
        required={p.required}
        aria-invalid={p.errors ? true : undefined}
        aria-describedby={described}
        onChange={(e) => p.onChange(e.target.value)}
        className="block w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base aria-[invalid=true]:border-2 aria-[invalid=true]:border-danger-700"
      />
      {p.errors ? <p id={`${id}-error`} className="text-sm font-semibold text-danger-700">✕ {p.errors.join(' ')}</p> : null}
    </div>
  );
}
