'use client';

import { useActionState, useId, useState } from 'react';
import { BatchStatusBadge } from '@/components/ui/batch-status';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { type DeviationFormState, idleDeviationFormState } from './detail-form-state';

/*
 * Extending the holds at triage (21 CFR 211.192: other batches that may be affected). The list is
 * the batches made on the same filler or with the same ring since the last passing weight check
 * before the deviation; QA ticks the ones to hold. A rejected batch is listed but cannot be ticked.
 */

export interface HoldSuggestionRow {
  batchId: number;
  lotNumber: string;
  productCode: string;
  productName: string;
  manufacturedOn: string;
  machineName: string | null;
  ringSerial: string | null;
  sharedWith: string;
  status: 'in_process' | 'on_hold' | 'released' | 'rejected';
  canHold: boolean;
}

export interface HoldSuggestionsProps {
  action: (previous: DeviationFormState, formData: FormData) => Promise<DeviationFormState>;
  deviationId: number;
  version: number;
  /** e.g. "since the passing weight check of 2026-11-15 08:00 UTC". */
  windowText: string;
  suggestions: HoldSuggestionRow[];
}

export function HoldSuggestions(props: HoldSuggestionsProps) {
  // Each answer remounts the form (key = attempt) so the ticks kept in state show again after React resets it.
  const [state, formAction] = useActionState(
    async (previous: DeviationFormState & { attempt: number }, formData: FormData) => ({
      ...(await props.action(previous, formData)),
      attempt: previous.attempt + 1,
    }),
    { ...idleDeviationFormState, attempt: 0 },
  );
  const uid = useId();
  const [ticked, setTicked] = useState<ReadonlySet<number>>(new Set());
  const toggle = (id: number) =>
    setTicked((prev) => {
      const next = new Set(prev);
      if (!next.delete(id)) next.add(id);
      return next;
    });
  const errors = state.fieldErrors.batchIds ?? [];

  return (
    <section aria-labelledby={`${uid}-heading`} className="rounded-lg border border-ink-200 bg-white p-5">
      <h3 id={`${uid}-heading`} className="text-lg font-semibold">
        Extend the holds
      </h3>
      <p className="mt-1 text-ink-600">
        Batches made on the same filler or with the same filling ring {props.windowText}. Tick those that may be affected to put
        them on hold under this deviation.
      </p>
      {props.suggestions.length === 0 ? (
        <p className="mt-3 text-ink-700">No other batches ran on this filler or ring in that time.</p>
      ) : (
        <form key={state.attempt} action={formAction} className="mt-4 flex flex-col gap-4" noValidate>
          {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
          <input type="hidden" name="id" value={props.deviationId} />
          <input type="hidden" name="version" value={props.version} />
          <fieldset aria-describedby={errors.length > 0 ? `${uid}-error` : undefined}>
            <legend className="sr-only">Batches to put on hold</legend>
            <div className="overflow-x-auto" role="region" aria-label="Suggested batches" tabIndex={0}>
              <table className="w-full text-left">
                <thead>
                  <tr className="border-b border-ink-200 text-sm text-ink-600">
                    <th scope="col" className="py-2 pr-3">
                      <span className="sr-only">Hold</span>
                    </th>
                    <th scope="col" className="py-2 pr-3">Lot</th>
                    <th scope="col" className="py-2 pr-3">Product</th>
                    <th scope="col" className="py-2 pr-3">Made on</th>
                    <th scope="col" className="py-2 pr-3">Filler · ring</th>
                    <th scope="col" className="py-2 pr-3">Status</th>
                  </tr>
                </thead>
                <tbody>
                  {props.suggestions.map((s) => {
                    const boxId = `${uid}-b${s.batchId}`;
                    return (
                      <tr key={s.batchId} className="border-b border-ink-100 align-top">
                        <td className="py-1 pr-3">
                          <label htmlFor={boxId} className="flex h-11 w-11 cursor-pointer items-center justify-center">
                            <input
                              id={boxId}
                              type="checkbox"
                              name="batchIds"
                              value={s.batchId}
                              disabled={!s.canHold}
                              defaultChecked={ticked.has(s.batchId)}
                              onChange={() => toggle(s.batchId)}
                              aria-describedby={`${boxId}-lot`}
                              className="h-5 w-5"
                            />
                            <span className="sr-only">Hold {s.lotNumber}</span>
                          </label>
                        </td>
                        <td id={`${boxId}-lot`} className="py-2 pr-3 font-semibold">
                          {s.lotNumber}
                          {!s.canHold ? <span className="block text-sm font-normal text-ink-600">rejected: nothing to hold</span> : null}
                        </td>
                        <td className="py-2 pr-3">
                          {s.productName} <span className="text-sm text-ink-600">({s.productCode})</span>
                        </td>
                        <td className="py-2 pr-3 whitespace-nowrap">{s.manufacturedOn}</td>
                        <td className="py-2 pr-3">
                          {s.machineName ?? '—'} · {s.ringSerial ?? '—'}
                          <span className="block text-sm text-ink-600">same {s.sharedWith}</span>
                        </td>
                        <td className="py-2 pr-3">
                          <BatchStatusBadge status={s.status} />
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </div>
          </fieldset>
          {errors.length > 0 ? (
            <p id={`${uid}-error`} className="text-sm font-semibold text-danger-700">
              ✕ {errors.join(' ')}
            </p>
          ) : null}
          <div>
            <SubmitButton pendingLabel="Putting on hold…">Put on hold</SubmitButton>
          </div>
        </form>
      )}
    </section>
  );
}
