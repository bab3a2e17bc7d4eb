'use client';

import { type FormEvent, useEffect, useState } from 'react';
import { buttonClasses } from '@/components/ui/button';
import type { DeviationListOptionsDto, ListOptionDto } from '@/lib/deviations/list-options';
import { classificationLabels, deviationStateLabels } from '@/lib/deviations/labels';
import type { DeviationListQuery } from '@/lib/validation/deviation-list';
import { deviationStates, type DeviationState } from '@/workflows/states';
import { activeFilterCount } from './list-query';

/*
 * The list's filters as a plain GET form, so they work before (or without) JavaScript; with it, the
 * form hands the new filters to the table, which fetches and rewrites the URL. On a tablet the panel
 * starts closed to leave the screen to the rows; on a wide screen it starts open.
 */

const classifications = Object.keys(classificationLabels) as (keyof typeof classificationLabels)[];

export type ListFilters = Omit<DeviationListQuery, 'page' | 'pageSize' | 'sort' | 'dir'>;

const inputClasses = 'min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base';
const labelClasses = 'flex flex-col gap-1 font-semibold text-ink-800';

function idOrNull(value: FormDataEntryValue | null): number | null {
  const n = typeof value === 'string' && value !== '' ? Number(value) : NaN;
  return Number.isInteger(n) && n > 0 ? n : null;
}

function textOrNull(value: FormDataEntryValue | null): string | null {
  return typeof value === 'string' && value.trim() !== '' ? value.trim() : null;
}

export function filtersFromForm(form: FormData): ListFilters {
  return {
    status: form.getAll('status').filter((s): s is DeviationState => (deviationStates as readonly unknown[]).includes(s)),
    classification: form
      .getAll('classification')
      .filter((c): c is (typeof classifications)[number] => (classifications as readonly unknown[]).includes(c)),
    productId: idOrNull(form.get('productId')),
    batchId: idOrNull(form.get('batchId')),
    lot: textOrNull(form.get('lot')),
    machineId: idOrNull(form.get('machineId')),
    ringId: idOrNull(form.get('ringId')),
    defectId: idOrNull(form.get('defectId')),
    ownerId: idOrNull(form.get('ownerId')),
    raisedFrom: textOrNull(form.get('raisedFrom')),
    raisedTo: textOrNull(form.get('raisedTo')),
    overdue: form.get('overdue') === 'true',
  };
}

export const noFilters: ListFilters = {
  status: [],
  classification: [],
  productId: null,
  batchId: null,
  lot: null,
  machineId: null,
  ringId: null,
  defectId: null,
  ownerId: null,
  raisedFrom: null,
  raisedTo: null,
  overdue: false,
};

function Select({
  name,
  label,
  value,
  options,
  anyLabel,
}: {
  name: string;
  label: string;
  value: number | null;
  options: ListOptionDto[];
  anyLabel: string;
}) {
  return (
    <label className={labelClasses}>
      {label}
      <select name={name} defaultValue={value === null ? '' : String(value)} className={inputClasses}>
        <option value="">{anyLabel}</option>
        {options.map((o) => (
          <option key={o.id} value={o.id}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}

export function DeviationListFilters({
  query,
  options,
  onApply,
}: {
  query: DeviationListQuery;
  options: DeviationListOptionsDto;
  onApply: (filters: ListFilters) => void;
}) {
  const [open, setOpen] = useState(false);
  useEffect(() => {
    if (window.matchMedia('(min-width: 64rem)').matches) setOpen(true);
  }, []);
  const active = activeFilterCount(query);
  // The form remounts when the applied filters change, so its uncontrolled fields show them.
  const formKey = JSON.stringify({ ...query, page: 0 });

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    onApply(filtersFromForm(new FormData(event.currentTarget)));
  }

  return (
    <details
      open={open}
      onToggle={(e) => setOpen(e.currentTarget.open)}
      className="mb-4 rounded-lg border border-ink-200 bg-white"
    >
      <summary className="flex min-h-11 cursor-pointer items-center px-4 py-2 font-semibold text-ink-900">
        Filters{active > 0 ? ` (${active} applied)` : ''}
      </summary>
      <form key={formKey} method="get" action="/deviations" onSubmit={submit} className="flex flex-col gap-4 border-t border-ink-200 p-4">
        <input type="hidden" name="sort" value={query.sort} />
        <input type="hidden" name="dir" value={query.dir} />
        <input type="hidden" name="pageSize" value={query.pageSize} />
        <div className="grid gap-4 md:grid-cols-2">
          <fieldset className="flex flex-col gap-1">
            <legend className="mb-1 font-semibold text-ink-800">Status</legend>
            <div className="flex flex-wrap gap-x-4">
              {deviationStates.map((s) => (
                <label key={s} className="inline-flex min-h-11 items-center gap-2">
                  <input type="checkbox" name="status" value={s} defaultChecked={query.status.includes(s)} className="h-5 w-5" />
                  {deviationStateLabels[s]}
                </label>
              ))}
            </div>
          </fieldset>
          <fieldset className="flex flex-col gap-1">
            <legend className="mb-1 font-semibold text-ink-800">Classification</legend>
            <div className="flex flex-wrap gap-x-4">
              {classifications.map((c) => (
                <label key={c} className="inline-flex min-h-11 items-center gap-2">
                  <input
                    type="checkbox"
                    name="classification"
                    value={c}
                    defaultChecked={query.classification.includes(c)}
                    className="h-5 w-5"
                  />
                  {classificationLabels[c]}
                </label>
              ))}
            </div>
            <label className="mt-2 inline-flex min-h-11 items-center gap-2 font-semibold text-ink-800">
              <input type="checkbox" name="overdue" value="true" defaultChecked={query.overdue} className="h-5 w-5" />
              Overdue only
            </label>
          </fieldset>
        </div>
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          <Select name="productId" label="Product" value={query.productId} options={options.products} anyLabel="Any product" />
          <label className={labelClasses}>
            Lot number
            <input name="lot" defaultValue={query.lot ?? ''} className={inputClasses} autoComplete="off" spellCheck={false} />
          </label>
          <Select name="machineId" label="Machine" value={query.machineId} options={options.machines} anyLabel="Any machine" />
          <Select name="ringId" label="Filling ring" value={query.ringId} options={options.rings} anyLabel="Any ring" />
          <Select name="defectId" label="Defect" value={query.defectId} options={options.defects} anyLabel="Any defect" />
          <Select name="ownerId" label="Owner" value={query.ownerId} options={options.owners} anyLabel="Anyone" />
          <label className={labelClasses}>
            Raised from
            <input type="date" name="raisedFrom" defaultValue={query.raisedFrom ?? ''} className={inputClasses} />
          </label>
          <label className={labelClasses}>
            Raised to (inclusive)
            <input type="date" name="raisedTo" defaultValue={query.raisedTo ?? ''} className={inputClasses} />
          </label>
        </div>
        {query.batchId !== null ? <input type="hidden" name="batchId" value={query.batchId} /> : null}
        <div className="flex flex-wrap gap-3">
          <button type="submit" className={buttonClasses('primary')}>
            Apply filters
          </button>
          {active > 0 ? (
            <a
              href="/deviations"
              onClick={(e) => {
                e.preventDefault();
                onApply(noFilters);
              }}
              className={buttonClasses('secondary')}
            >
              Clear all filters
            </a>
          ) : null}
        </div>
      </form>
    </details>
  );
}
