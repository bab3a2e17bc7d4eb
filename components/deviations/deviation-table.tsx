'use client';

import {
  columnFilteringFeature,
  createColumnHelper,
  rowPaginationFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
  type ColumnFiltersState,
  type PaginationState,
  type SortingState,
  type Updater,
} from '@tanstack/react-table';
import Link from 'next/link';
import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { ClassificationBadge } from '@/components/risk/classification-badge';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { StatusBadge, StatusIcon, type Tone } from '@/components/ui/status-badge';
import { deviationStateLabels } from '@/lib/deviations/labels';
import type { DeviationListOptionsDto } from '@/lib/deviations/list-options';
import type { DeviationPage, DeviationRowDto } from '@/lib/deviations/queries';
import type { DeviationListQuery, DeviationListSort } from '@/lib/validation/deviation-list';
import type { DeviationState } from '@/workflows/states';
import { DeviationListFilters, type ListFilters } from './list-filters';
import { activeFilterCount, deviationListSearch, type ListDefaults } from './list-query';
import { ListPager } from './list-pager';

/*
 * The deviation list. The server owns paging, sorting and filtering (there may be 100,000 rows), so
 * the table only describes columns and state: every processing stage is manual and no client row
 * model is registered. The state lives in the URL, rewritten in place (history.replaceState keeps
 * Next's search params in step without re-rendering the server page), and each change fetches
 * /api/deviations. The server renders the first page, so the list reads without JavaScript.
 */

const features = tableFeatures({ columnFilteringFeature, rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, DeviationRowDto>();

const stateTones: Record<DeviationState, Tone> = {
  draft: 'neutral',
  reported: 'info',
  triage: 'warn',
  investigation: 'warn',
  approval: 'info',
  closed: 'ok',
  cancelled: 'neutral',
  discarded: 'neutral',
};

const sortable = new Set<string>(['number', 'raised', 'due', 'rpn', 'status', 'classification'] satisfies DeviationListSort[]);
/** Filters that belong to a column, mirrored into the table's filter state. */
const columnFilterKeys: Partial<Record<string, keyof ListFilters>> = {
  status: 'status',
  classification: 'classification',
  defect: 'defectId',
  lot: 'lot',
  machine: 'machineId',
  owner: 'ownerId',
};

const day = (iso: string) => iso.slice(0, 10);
const dash = <span className="text-ink-500">—</span>;

const columns = helper.columns([
  helper.accessor('number', {
    id: 'number',
    header: 'Number',
    cell: ({ row }) => (
      <Link href={`/deviations/${row.original.id}`} className="font-semibold whitespace-nowrap underline underline-offset-4">
        {row.original.number ?? `Draft ${row.original.id}`}
      </Link>
    ),
  }),
  helper.accessor('raisedAt', { id: 'raised', header: 'Raised', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue())}</span> }),
  helper.accessor('ageDays', {
    id: 'age',
    header: 'Age (days)',
    meta: { numeric: true },
    cell: (c) => <span className="tabular-nums">{c.getValue()}</span>,
  }),
  helper.accessor('title', { id: 'title', header: 'Title', cell: (c) => <span className="block min-w-44">{c.getValue()}</span> }),
  helper.accessor('defect', { id: 'defect', header: 'Defect', cell: (c) => c.getValue() ?? dash }),
  helper.accessor('lot', { id: 'lot', header: 'Lot', cell: (c) => <span className="whitespace-nowrap">{c.getValue() ?? dash}</span> }),
  helper.accessor('machine', { id: 'machine', header: 'Machine', cell: (c) => <span className="whitespace-nowrap">{c.getValue() ?? dash}</span> }),
  helper.accessor('classification', {
    id: 'classification',
    header: 'Class',
    cell: (c) => {
      const value = c.getValue();
      return value ? <ClassificationBadge classification={value} /> : <span className="text-ink-600">Not yet</span>;
    },
  }),
  helper.accessor('rpn', {
    id: 'rpn',
    header: 'RPN',
    meta: { numeric: true },
    cell: (c) => <span className="tabular-nums">{c.getValue() ?? dash}</span>,
  }),
  helper.accessor('status', {
    id: 'status',
    header: 'Status',
    cell: (c) => <StatusBadge tone={stateTones[c.getValue()]} label={deviationStateLabels[c.getValue()]} />,
  }),
  helper.accessor('owner', { id: 'owner', header: 'Owner', cell: (c) => <span className="whitespace-nowrap">{c.getValue() ?? dash}</span> }),
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

export function DeviationTable({
  initialQuery,
  initialPage,
  defaults,
  options,
}: {
  initialQuery: DeviationListQuery;
  initialPage: DeviationPage;
  defaults: ListDefaults;
  options: DeviationListOptionsDto;
}) {
  const [query, setQuery] = useState(initialQuery);
  const [page, setPage] = useState(initialPage);
  const [load, setLoad] = useState<Load>({ status: 'idle' });
  const [attempt, setAttempt] = useState(0);
  const search = deviationListSearch(query, defaults);
  const loadedSearch = useRef(deviationListSearch(initialQuery, defaults));

  // A fresh server render (a nav link back to this list) brings a new first page: start from it.
  useEffect(() => {
    loadedSearch.current = deviationListSearch(initialQuery, defaults);
    setQuery(initialQuery);
    setPage(initialPage);
    setLoad({ status: 'idle' });
  }, [initialQuery, initialPage, defaults]);

  useEffect(() => {
    const href = search ? `/deviations?${search}` : '/deviations';
    if (`${window.location.pathname}${window.location.search}` !== href) window.history.replaceState(null, '', href);
    if (search === loadedSearch.current && attempt === 0) return;
    const controller = new AbortController();
    setLoad({ status: 'loading' });
    fetch(`/api/deviations?${search}`, { signal: controller.signal, headers: { accept: 'application/json' } })
      .then(async (response) => {
        const body: unknown = await response.json().catch(() => null);
        if (!response.ok) {
          const message =
            body && typeof body === 'object' && 'message' in body && typeof body.message === 'string'
              ? body.message
              : `The server answered ${response.status}.`;
          throw new Error(message);
        }
        loadedSearch.current = search;
        setPage(body as DeviationPage);
        setLoad({ status: 'idle' });
      })
      .catch((error: unknown) => {
        if (controller.signal.aborted) return;
        setLoad({
          status: 'error',
          message: error instanceof TypeError ? 'The server could not be reached.' : error instanceof Error ? error.message : String(error),
        });
      });
    return () => controller.abort();
  }, [search, attempt]);

  const sorting = useMemo<SortingState>(() => [{ id: query.sort, desc: query.dir === 'desc' }], [query.sort, query.dir]);
  const pagination = useMemo<PaginationState>(() => ({ pageIndex: query.page - 1, pageSize: query.pageSize }), [query.page, query.pageSize]);
  const columnFilters = useMemo<ColumnFiltersState>(
    () =>
      Object.entries(columnFilterKeys).flatMap(([id, key]) => {
        const value = key ? query[key] : null;
        return value === null || value === false || (Array.isArray(value) && value.length === 0) ? [] : [{ id, value }];
      }),
    [query],
  );

  const onSortingChange = useCallback((updater: Updater<SortingState>) => {
    setQuery((q) => {
      const next = resolve(updater, [{ id: q.sort, desc: q.dir === 'desc' }])[0];
      if (!next || !sortable.has(next.id)) return q;
      return { ...q, sort: next.id as DeviationListSort, dir: next.desc ? 'desc' : 'asc', page: 1 };
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
    state: { sorting, pagination, columnFilters },
    onSortingChange,
    onPaginationChange,
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    rowCount: page.total,
    enableSortingRemoval: false,
    enableMultiSort: false,
    enableColumnFilters: false,
  });

  const applyFilters = useCallback((filters: ListFilters) => setQuery((q) => ({ ...q, ...filters, page: 1 })), []);

  const scroller = useRef<HTMLDivElement>(null);
  const [overflows, setOverflows] = useState<boolean | null>(null);
  useLayoutEffect(() => {
    const el = scroller.current;
    if (!el) return;
    const measure = () => setOverflows(el.scrollWidth > el.clientWidth + 1);
    measure();
    const observer = new ResizeObserver(measure);
    observer.observe(el);
    return () => observer.disconnect();
  }, [page.rows.length]);

  const busy = load.status === 'loading';
  const first = page.total === 0 ? 0 : (page.page - 1) * page.pageSize + 1;
  const last = Math.min(page.total, page.page * page.pageSize);
  const count = new Intl.NumberFormat('en-US');

  return (
    <div>
      <DeviationListFilters query={query} options={options} onApply={applyFilters} />

      <div aria-live="polite" className="mb-2 flex min-h-11 flex-wrap items-center gap-3 text-ink-700">
        {busy ? (
          <span className="inline-flex items-center gap-2 font-semibold">
            <span aria-hidden="true" className="h-4 w-4 animate-spin rounded-full border-2 border-ink-400 border-t-ink-900" />
            Loading deviations…
          </span>
        ) : page.total === 0 ? null : page.rows.length === 0 ? (
          <span>There is no page {page.page}.</span>
        ) : (
          <span>
            Showing {count.format(first)}–{count.format(last)} of {count.format(page.total)} deviations
          </span>
        )}
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
          <Notice tone="neutral" title="No deviations match" live={false}>
            <p>
              {activeFilterCount(query) > 0
                ? 'Nothing matches these filters. Loosen or clear them to see more.'
                : 'No deviation has been raised yet.'}
            </p>
          </Notice>
        ) : (
          <>
            {overflows !== false ? (
              <p id="deviation-scroll-hint" className={`mb-1 text-sm text-ink-600 ${overflows === null ? 'xl:hidden' : ''}`}>
                <span aria-hidden="true">↔</span> The table is wider than the screen: scroll it sideways to see every column.
              </p>
            ) : null}
            <div
              ref={scroller}
              role="region"
              aria-labelledby="deviation-table-caption"
              aria-describedby={overflows !== false ? 'deviation-scroll-hint' : undefined}
              tabIndex={0}
              className="overflow-x-auto rounded-lg border border-ink-200 bg-white focus-visible:outline-2 focus-visible:outline-offset-2"
            >
              <table className="w-full min-w-[66rem] border-collapse text-left">
                <caption id="deviation-table-caption" className="sr-only">
                  Deviations, page {page.page}, sorted by {query.sort} {query.dir === 'asc' ? 'ascending' : 'descending'}
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
                                onClick={() =>
                                  table.setSorting([{ id: header.column.id, desc: sorted ? sorted === 'asc' : header.column.id !== 'number' }])
                                }
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

      <ListPager
        page={query.page}
        pageCount={table.getPageCount()}
        hrefFor={(p) => {
          const s = deviationListSearch({ ...query, page: p }, defaults);
          return s ? `/deviations?${s}` : '/deviations';
        }}
        onGo={(p) => table.setPageIndex(p - 1)}
      />
    </div>
  );
}
