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
import { StatusIcon } from '@/components/ui/status-badge';
import { capaSourceLabels, capaStateLabels } from '@/lib/capa/labels';
import { type CapaListQuery, type CapaListSort, capaListSearch } from '@/lib/capa/list-query';
import type { CapaOwnerOptionDto, CapaPage, CapaRowDto } from '@/lib/capa/queries';
import { capaStates } from '@/workflows/states';
import { CapaStatusBadge } from './status-badge';

/*
 * The CAPA list, on the deviation list's conventions: the server pages, sorts and filters (every
 * stage manual, no client row model), the state lives in the URL (rewritten in place) and each change
 * fetches /api/capa. The server renders the first page, so the list reads without JavaScript.
 */

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, CapaRowDto>();
const sortable = new Set<string>(['number', 'created', 'due', 'status'] satisfies CapaListSort[]);
const day = (iso: string) => iso.slice(0, 10);
const dash = <span className="text-ink-500">—</span>;

const columns = helper.columns([
  helper.accessor('number', {
    id: 'number',
    header: 'Number',
    cell: ({ row }) => (
      <Link href={`/capa/${row.original.id}`} className="font-semibold whitespace-nowrap underline underline-offset-4">
        {row.original.number}
      </Link>
    ),
  }),
  helper.accessor('createdAt', { id: 'created', header: 'Opened', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue())}</span> }),
  helper.accessor('title', { id: 'title', header: 'Title', cell: (c) => <span className="block min-w-44">{c.getValue()}</span> }),
  helper.accessor('sourceType', {
    id: 'source',
    header: 'Source',
    cell: ({ row }) => (
      <span className="whitespace-nowrap">
        {capaSourceLabels[row.original.sourceType]}
        {row.original.sourceNumber ? <span className="block text-sm text-ink-600">{row.original.sourceNumber}</span> : null}
      </span>
    ),
  }),
  helper.accessor('status', { id: 'status', header: 'Status', cell: (c) => <CapaStatusBadge status={c.getValue()} /> }),
  helper.accessor('actionsPlanned', {
    id: 'actions',
    header: 'Actions done',
    meta: { numeric: true },
    cell: ({ row }) =>
      row.original.actionsPlanned === 0 ? dash : <span className="tabular-nums">{row.original.actionsDone} / {row.original.actionsPlanned}</span>,
  }),
  helper.accessor('owner', { id: 'owner', header: 'Owner', cell: (c) => <span className="whitespace-nowrap">{c.getValue()}</span> }),
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

function Filters({ query, owners, onApply }: { query: CapaListQuery; owners: CapaOwnerOptionDto[]; onApply: (q: Partial<CapaListQuery>) => void }) {
  return (
    <form
      className="mb-4 flex flex-wrap items-end gap-4 rounded-lg border border-ink-200 bg-white p-4"
      onSubmit={(event) => {
        event.preventDefault();
        const form = new FormData(event.currentTarget);
        const ownerId = form.get('ownerId')?.toString() ?? '';
        onApply({
          status: form.getAll('status').map(String) as CapaListQuery['status'],
          source: form.getAll('source').map(String) as CapaListQuery['source'],
          ownerId: ownerId ? Number(ownerId) : null,
          overdue: form.get('overdue') === 'on',
        });
      }}
    >
      <fieldset className="flex flex-col gap-1">
        <legend className="font-semibold">Status</legend>
        <div className="flex flex-wrap gap-x-4">
          {capaStates.map((s) => (
            <label key={s} className="inline-flex min-h-11 items-center gap-2">
              <input type="checkbox" name="status" value={s} defaultChecked={query.status.includes(s)} className="h-5 w-5" />
              {capaStateLabels[s]}
            </label>
          ))}
        </div>
      </fieldset>
      <fieldset className="flex flex-col gap-1">
        <legend className="font-semibold">Source</legend>
        <div className="flex flex-wrap gap-x-4">
          {(Object.keys(capaSourceLabels) as (keyof typeof capaSourceLabels)[]).map((s) => (
            <label key={s} className="inline-flex min-h-11 items-center gap-2">
              <input type="checkbox" name="source" value={s} defaultChecked={query.source.includes(s)} className="h-5 w-5" />
              {capaSourceLabels[s]}
            </label>
          ))}
        </div>
      </fieldset>
      <div className="flex flex-col gap-1">
        <label htmlFor="capa-owner-filter" className="font-semibold">
          Owner
        </label>
        <select
          id="capa-owner-filter"
          name="ownerId"
          defaultValue={query.ownerId === null ? '' : String(query.ownerId)}
          className="min-h-11 rounded-md border border-ink-400 bg-white px-3"
        >
          <option value="">Anyone</option>
          {owners.map((o) => (
            <option key={o.id} value={o.id}>
              {o.label}
            </option>
          ))}
        </select>
      </div>
      <label className="inline-flex min-h-11 items-center gap-2">
        <input type="checkbox" name="overdue" defaultChecked={query.overdue} className="h-5 w-5" />
        Overdue only
      </label>
      <Button type="submit" variant="secondary">
        Apply filters
      </Button>
    </form>
  );
}

export function CapaTable({ initialQuery, initialPage, owners }: { initialQuery: CapaListQuery; initialPage: CapaPage; owners: CapaOwnerOptionDto[] }) {
  const [query, setQuery] = useState(initialQuery);
  const [page, setPage] = useState(initialPage);
  const [load, setLoad] = useState<Load>({ status: 'idle' });
  const [attempt, setAttempt] = useState(0);
  const search = capaListSearch(query);
  const loadedSearch = useRef(capaListSearch(initialQuery));

  useEffect(() => {
    const href = search ? `/capa?${search}` : '/capa';
    if (`${window.location.pathname}${window.location.search}` !== href) window.history.replaceState(null, '', href);
    if (search === loadedSearch.current && attempt === 0) return;
    const controller = new AbortController();
    setLoad({ status: 'loading' });
    fetch(`/api/capa?${search}`, { signal: controller.signal, headers: { accept: 'application/json' } })
      .then(async (response) => {
        const body: unknown = await response.json().catch(() => null);
        if (!response.ok) {
          const message =
            body && typeof body === 'object' && 'message' in body && typeof body.message === 'string' ? body.message : `The server answered ${response.status}.`;
          throw new Error(message);
        }
        loadedSearch.current = search;
        setPage(body as CapaPage);
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
      return { ...q, sort: next.id as CapaListSort, dir: next.desc ? 'desc' : 'asc', page: 1 };
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
    const s = capaListSearch({ ...query, page: p });
    return s ? `/capa?${s}` : '/capa';
  };
  const go = (p: number) => (event: React.MouseEvent<HTMLAnchorElement>) => {
    if (event.metaKey || event.ctrlKey || event.shiftKey || event.button !== 0) return;
    event.preventDefault();
    table.setPageIndex(p - 1);
  };

  return (
    <div>
      <Filters key={search} query={query} owners={owners} onApply={(f) => setQuery((q) => ({ ...q, ...f, page: 1 }))} />
      <div aria-live="polite" className="mb-2 flex min-h-11 items-center text-ink-700">
        {busy ? <span className="font-semibold">Loading CAPAs…</span> : page.total === 0 ? null : <span>Showing {first}–{last} of {page.total} CAPAs</span>}
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
          <Notice tone="neutral" title="No CAPAs match" live={false}>
            <p>Nothing matches these filters. Loosen or clear them to see more.</p>
          </Notice>
        ) : (
          <>
          <p id="capa-scroll-hint" className="mb-1 text-sm text-ink-600 xl:hidden">
            <span aria-hidden="true">↔</span> On a narrow screen the table scrolls sideways to show every column.
          </p>
          <div
            role="region"
            aria-labelledby="capa-table-caption"
            aria-describedby="capa-scroll-hint"
            tabIndex={0}
            className="overflow-x-auto rounded-lg border border-ink-200 bg-white focus-visible:outline-2 focus-visible:outline-offset-2"
          >
            <table className="w-full min-w-[56rem] border-collapse text-left">
              <caption id="capa-table-caption" className="sr-only">
                CAPAs, page {page.page}, sorted by {query.sort} {query.dir === 'asc' ? 'ascending' : 'descending'}
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
                              onClick={() => table.setSorting([{ id: header.column.id, desc: sorted ? sorted === 'asc' : header.column.id !== 'number' }])}
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
        <nav aria-label="CAPA list pages" className="mt-4">
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
