'use client';

import {
  createColumnHelper,
  rowPaginationFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
  type PaginationState,
  type SortingState,
  type Updater,
} from '@tanstack/react-table';
import Link from 'next/link';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { StatusBadge, StatusIcon } from '@/components/ui/status-badge';
import { complaintStateLabels } from '@/lib/complaints/labels';
import { type ComplaintListQuery, type ComplaintListSort, complaintListSearch } from '@/lib/complaints/list-query';
import type { ComplaintPage, ComplaintRowDto, OptionDto, ProductOptionDto } from '@/lib/complaints/queries';
import { complaintStates } from '@/workflows/states';
import { ComplaintStatusBadge, ReportCountdownBadge } from './status-badge';

/*
 * The complaint list, on the deviation and CAPA lists' conventions: the server pages, sorts and
 * filters (every stage manual, no client row model), the state lives in the URL (rewritten in place)
 * and each change fetches /api/complaints. The server renders the first page, so the list reads
 * without JavaScript. No column names the complainant: personal data stays on the record page, for QA.
 */

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, ComplaintRowDto>();
const sortable = new Set<string>(['number', 'received', 'status', 'due', 'report_due'] satisfies ComplaintListSort[]);
const day = (iso: string) => iso.slice(0, 10);
const dash = <span className="text-ink-500">—</span>;
const yesNo = (v: boolean | null) => (v === null ? dash : v ? 'Yes' : 'No');

const columns = helper.columns([
  helper.accessor('number', {
    id: 'number',
    header: 'Number',
    cell: ({ row }) => (
      <Link href={`/complaints/${row.original.id}`} className="font-semibold whitespace-nowrap underline underline-offset-4">
        {row.original.number}
      </Link>
    ),
  }),
  helper.accessor('receivedOn', { id: 'received', header: 'Received', cell: (c) => <span className="whitespace-nowrap tabular-nums">{c.getValue()}</span> }),
  helper.accessor('product', { id: 'product', header: 'Product', cell: (c) => <span className="block min-w-40">{c.getValue() ?? '—'}</span> }),
  helper.accessor('lot', {
    id: 'lot',
    header: 'Lot',
    cell: ({ row }) => (
      <span className="whitespace-nowrap">
        {row.original.lot ?? <span className="text-ink-600">not given</span>}
        {row.original.lotUnknown ? (
          <span className="mt-1 block">
            <StatusBadge tone="warn" label="Not in batch records" />
          </span>
        ) : null}
      </span>
    ),
  }),
  helper.accessor('categoryLabel', { id: 'category', header: 'Category', cell: (c) => c.getValue() ?? <span className="text-ink-600">not assessed</span> }),
  helper.accessor('adverseEvent', {
    id: 'adverse',
    header: 'Adverse event',
    cell: ({ row }) => (
      <span className="whitespace-nowrap">
        {yesNo(row.original.adverseEvent)}
        {row.original.seriousAdverseEvent ? <span className="block font-semibold text-danger-700">serious</span> : null}
      </span>
    ),
  }),
  helper.accessor('reportable', {
    id: 'report_due',
    header: 'Reportable',
    cell: ({ row }) =>
      row.original.report ? (
        <span className="flex flex-col gap-1">
          <span className="whitespace-nowrap tabular-nums">Due {row.original.report.dueOn}</span>
          <ReportCountdownBadge report={row.original.report} compact />
        </span>
      ) : (
        yesNo(row.original.reportable)
      ),
  }),
  helper.accessor('status', { id: 'status', header: 'Status', cell: (c) => <ComplaintStatusBadge status={c.getValue()} /> }),
  helper.accessor('owner', { id: 'owner', header: 'Owner', cell: (c) => <span className="whitespace-nowrap">{c.getValue() ?? '—'}</span> }),
  helper.accessor('dueAt', {
    id: 'due',
    header: 'Due',
    cell: ({ row }) => {
      const due = row.original.dueAt;
      if (!due) return dash;
      return row.original.overdue ? (
        <span className="inline-flex items-center gap-1 font-semibold whitespace-nowrap text-danger-700">
          <StatusIcon tone="danger" />
          <span className="tabular-nums">{day(due)}</span> overdue
        </span>
      ) : (
        <span className="whitespace-nowrap tabular-nums">{day(due)}</span>
      );
    },
  }),
]);

type Load = { status: 'idle' } | { status: 'loading' } | { status: 'error'; message: string };

function resolve<T>(updater: Updater<T>, old: T): T {
  return typeof updater === 'function' ? (updater as (old: T) => T)(old) : updater;
}

function Filters({
  query,
  products,
  categories,
  onApply,
}: {
  query: ComplaintListQuery;
  products: ProductOptionDto[];
  categories: OptionDto[];
  onApply: (q: Partial<ComplaintListQuery>) => void;
}) {
  return (
    <form
      className="mb-4 flex flex-wrap items-end gap-4 rounded-lg border border-ink-200 bg-white p-4"
      onSubmit={(event) => {
        event.preventDefault();
        const form = new FormData(event.currentTarget);
        const productId = form.get('productId')?.toString() ?? '';
        const category = form.get('category')?.toString() ?? '';
        const lot = form.get('lot')?.toString().trim() ?? '';
        onApply({
          status: form.getAll('status').map(String) as ComplaintListQuery['status'],
          productId: productId ? Number(productId) : null,
          category: category || null,
          lot: lot || null,
          reportable: form.get('reportable') === 'on',
          lotUnknown: form.get('lotUnknown') === 'on',
        });
      }}
    >
      <fieldset className="flex flex-col gap-1">
        <legend className="font-semibold">Status</legend>
        <div className="flex flex-wrap gap-x-4">
          {complaintStates.map((s) => (
            <label key={s} className="inline-flex min-h-11 items-center gap-2">
              <input type="checkbox" name="status" value={s} defaultChecked={query.status.includes(s)} className="h-5 w-5" />
              {complaintStateLabels[s]}
            </label>
          ))}
        </div>
      </fieldset>
      <div className="flex flex-col gap-1">
        <label htmlFor="complaint-product-filter" className="font-semibold">
          Product
        </label>
        <select
          id="complaint-product-filter"
          name="productId"
          defaultValue={query.productId === null ? '' : String(query.productId)}
          className="min-h-11 max-w-72 rounded-md border border-ink-400 bg-white px-3"
        >
          <option value="">Any product</option>
          {products.map((p) => (
            <option key={p.id} value={p.id}>
              {p.label}
            </option>
          ))}
        </select>
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor="complaint-category-filter" className="font-semibold">
          Category
        </label>
        <select id="complaint-category-filter" name="category" defaultValue={query.category ?? ''} className="min-h-11 rounded-md border border-ink-400 bg-white px-3">
          <option value="">Any category</option>
          {categories.map((c) => (
            <option key={c.value} value={c.value}>
              {c.label}
            </option>
          ))}
        </select>
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor="complaint-lot-filter" className="font-semibold">
          Lot
        </label>
        <input id="complaint-lot-filter" name="lot" defaultValue={query.lot ?? ''} className="min-h-11 w-44 rounded-md border border-ink-400 bg-white px-3" />
      </div>
      <label className="inline-flex min-h-11 items-center gap-2">
        <input type="checkbox" name="reportable" defaultChecked={query.reportable} className="h-5 w-5" />
        Reportable only
      </label>
      <label className="inline-flex min-h-11 items-center gap-2">
        <input type="checkbox" name="lotUnknown" defaultChecked={query.lotUnknown} className="h-5 w-5" />
        Unknown lots only
      </label>
      <Button type="submit" variant="secondary">
        Apply filters
      </Button>
    </form>
  );
}

export function ComplaintTable({ initialQuery, initialPage, products, categories }: { initialQuery: ComplaintListQuery; initialPage: ComplaintPage; products: ProductOptionDto[]; categories: OptionDto[] }) {
  const [query, setQuery] = useState(initialQuery);
  const [page, setPage] = useState(initialPage);
  const [load, setLoad] = useState<Load>({ status: 'idle' });
  const [attempt, setAttempt] = useState(0);
  const search = complaintListSearch(query);
  const loadedSearch = useRef(complaintListSearch(initialQuery));

  useEffect(() => {
    const href = search ? `/complaints?${search}` : '/complaints';
    if (`${window.location.pathname}${window.location.search}` !== href) window.history.replaceState(null, '', href);
    if (search === loadedSearch.current && attempt === 0) return;
    const controller = new AbortController();
    setLoad({ status: 'loading' });
    fetch(`/api/complaints?${search}`, { signal: controller.signal, headers: { accept: 'application/json' } })
      .then(async (response) => {
        const body: unknown = await response.json().catch(() => null);
        if (!response.ok) {
          const message =
            body && typeof body === 'object' && 'message' in body && typeof body.message === 'string' ? body.message : `The server answered ${response.status}.`;
          throw new Error(message);
        }
        loadedSearch.current = search;
        setPage(body as ComplaintPage);
        setLoad({ status: 'idle' });
      })
      .catch((error: unknown) => {
        if (controller.signal.aborted) return;
        setLoad({ status: 'error', message: error instanceof TypeError ? 'The server could not be reached.' : error instanceof Error ? error.message : String(error) });
      });
    return () => controller.abort();
  }, [search, attempt]);

  const sorting = useMemo<SortingState>(() => [{ id: query.sort, desc: query.dir === 'desc' }], [query.sort, query.dir]);
  const pagination = useMemo<PaginationState>(() => ({ pageIndex: query.page - 1, pageSize: query.pageSize }), [query.page, query.pageSize]);
  const onSortingChange = useCallback((updater: Updater<SortingState>) => {
    setQuery((q) => {
      const next = resolve(updater, [{ id: q.sort, desc: q.dir === 'desc' }])[0];
      if (!next || !sortable.has(next.id)) return q;
      return { ...q, sort: next.id as ComplaintListSort, dir: next.desc ? 'desc' : 'asc', page: 1 };
    });
  }, []);
  const onPaginationChange = useCallback((updater: Updater<PaginationState>) => {
    setQuery((q) => {
      const next = resolve(updater, { pageIndex: q.page - 1, pageSize: q.pageSize });
      return { ...q, page: next.pageIndex + 1, pageSize: next.pageSize };
    });
  }, []);

  const table = useTable({
    features,
    columns,
    data: page.rows,
    getRowId: (row) => String(row.id),
    state: { sorting, pagination },
    onSortingChange,
    onPaginationChange,
    manualSorting: true,
    manualPagination: true,
    rowCount: page.total,
    enableSortingRemoval: false,
    enableMultiSort: false,
  });

  const busy = load.status === 'loading';
  const first = page.total === 0 ? 0 : (page.page - 1) * page.pageSize + 1;
  const last = Math.min(page.total, page.page * page.pageSize);
  const pageCount = table.getPageCount();
  const hrefFor = (p: number) => {
    const s = complaintListSearch({ ...query, page: p });
    return s ? `/complaints?${s}` : '/complaints';
  };
  const go = (p: number) => (event: React.MouseEvent<HTMLAnchorElement>) => {
    if (event.metaKey || event.ctrlKey || event.shiftKey || event.button !== 0) return;
    event.preventDefault();
    table.setPageIndex(p - 1);
  };

  return (
    <div>
      <Filters key={search} query={query} products={products} categories={categories} onApply={(f) => setQuery((q) => ({ ...q, ...f, page: 1 }))} />
      <div aria-live="polite" className="mb-2 flex min-h-11 items-center text-ink-700">
        {busy ? <span className="font-semibold">Loading complaints…</span> : page.total === 0 ? null : <span>Showing {first}–{last} of {page.total} complaints</span>}
      </div>
      {load.status === 'error' ? (
        <div className="mb-4">
          <Notice tone="danger" title="The list could not be loaded">
            <p>{load.message} The rows below are from the last successful load.</p>
            <Button variant="secondary" className="mt-2" onClick={() => setAttempt((n) => n + 1)}>
              Try again
            </Button>
          </Notice>
        </div>
      ) : null}
      <div aria-busy={busy} className={busy ? 'opacity-60 transition-opacity' : 'transition-opacity'}>
        {page.total === 0 ? (
          <Notice tone="neutral" title="No complaints match" live={false}>
            <p>Nothing matches these filters. Loosen or clear them to see more.</p>
          </Notice>
        ) : (
          <>
          <p id="complaint-scroll-hint" className="mb-1 text-sm text-ink-600 xl:hidden">
            <span aria-hidden="true">↔</span> On a narrow screen the table scrolls sideways to show every column.
          </p>
          <div
            role="region"
            aria-labelledby="complaint-table-caption"
            aria-describedby="complaint-scroll-hint"
            tabIndex={0}
            className="overflow-x-auto rounded-lg border border-ink-200 bg-white focus-visible:outline-2 focus-visible:outline-offset-2"
          >
            <table className="w-full min-w-[72rem] border-collapse text-left">
              <caption id="complaint-table-caption" className="sr-only">
                Complaints, page {page.page}, sorted by {query.sort} {query.dir === 'asc' ? 'ascending' : 'descending'}
              </caption>
              <thead className="bg-ink-100 text-sm text-ink-700">
                {table.getHeaderGroups().map((group) => (
                  <tr key={group.id}>
                    {group.headers.map((header) => {
                      const numeric = (header.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                      const canSort = sortable.has(header.column.id);
                      const sorted = header.column.getIsSorted();
                      return (
                        <th
                          key={header.id}
                          scope="col"
                          aria-sort={canSort ? (sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none') : undefined}
                          className={`px-2 py-2 font-semibold whitespace-nowrap ${numeric ? 'text-right' : ''}`}
                        >
                          {canSort ? (
                            <button
                              type="button"
                              onClick={() => table.setSorting([{ id: header.column.id, desc: sorted ? sorted === 'asc' : header.column.id !== 'number' && header.column.id !== 'report_due' }])}
                              className="-mx-2 inline-flex min-h-11 items-center gap-1 rounded px-2 font-semibold hover:bg-ink-200"
                            >
                              <table.FlexRender header={header} />
                              <span aria-hidden="true" className="w-3 text-ink-900">
                                {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                              </span>
                            </button>
                          ) : (
                            <table.FlexRender header={header} />
                          )}
                        </th>
                      );
                    })}
                  </tr>
                ))}
              </thead>
              <tbody>
                {table.getRowModel().rows.map((row) => (
                  <tr key={row.id} className={`border-t border-ink-200 ${row.original.overdue ? 'bg-danger-100/40' : ''}`}>
                    {row.getAllCells().map((cell) => {
                      const numeric = (cell.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                      return (
                        <td key={cell.id} className={`px-2 py-2 align-top ${numeric ? 'text-right' : ''}`}>
                          <table.FlexRender cell={cell} />
                        </td>
                      );
                    })}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          </>
        )}
      </div>
      {pageCount > 1 ? (
        <nav aria-label="Complaint list pages" className="mt-4">
          <ul className="flex flex-wrap items-center gap-2">
            {Array.from({ length: pageCount }, (_, i) => i + 1).map((p) => (
              <li key={p}>
                <a
                  href={hrefFor(p)}
                  onClick={go(p)}
                  aria-current={p === query.page ? 'page' : undefined}
                  aria-label={`Page ${p}`}
                  className={`inline-flex min-h-11 min-w-11 items-center justify-center rounded-md border px-3 font-semibold ${
                    p === query.page ? 'border-ink-900 bg-ink-900 text-white' : 'border-ink-400 bg-white hover:bg-ink-100'
                  }`}
                >
                  {p}
                </a>
              </li>
            ))}
          </ul>
        </nav>
      ) : null}
    </div>
  );
}
