import type { Metadata } from 'next';
import Link from 'next/link';
import { BatchStatusBadge } from '@/components/ui/batch-status';
import { PageHeader } from '@/components/ui/page-header';
import { Pagination } from '@/components/ui/pagination';
import { requirePageUser } from '@/lib/auth/session';
import { batchRecordRetention } from '@/lib/clocks';
import {
  type BatchStatus,
  batchStatusLabels,
  batchStatuses,
  listBatches,
  parseBatchListQuery,
} from '@/lib/master-data/queries';

export const metadata: Metadata = { title: 'Batches' };

const count = new Intl.NumberFormat('en-US');

function hrefFor(page: number, status: BatchStatus | null): string {
  const params = new URLSearchParams();
  if (status) params.set('status', status);
  if (page > 1) params.set('page', String(page));
  const query = params.toString();
  return query ? `/batches?${query}` : '/batches';
}

/** How long the batch's records must be kept, and the rule (21 CFR 211.180(a) or 111.605(a)). */
function RetentionCell({ batch }: { batch: { regulatoryClass: 'drug' | 'supplement'; expiresOn: string | null } }) {
  const retention = batchRecordRetention(batch);
  if (!retention) return <span className="text-ink-600">No expiry date: from distribution</span>;
  return (
    <span className="flex flex-col">
      <span className="whitespace-nowrap tabular-nums">{retention.retainUntil}</span>
      <span className="text-sm text-ink-600" title={retention.rule}>
        {retention.citation}
      </span>
    </span>
  );
}

export default async function BatchesPage({ searchParams }: PageProps<'/batches'>) {
  const query = parseBatchListQuery(await searchParams);
  await requirePageUser('batch.read', { returnTo: hrefFor(query.page, query.status) });
  const result = await listBatches(query);
  const first = result.total === 0 ? 0 : (result.page - 1) * result.pageSize + 1;
  const last = Math.min(result.total, result.page * result.pageSize);
  const filters: { status: BatchStatus | null; label: string }[] = [
    { status: null, label: 'All' },
    ...batchStatuses.map((s) => ({ status: s, label: batchStatusLabels[s] })),
  ];

  return (
    <>
      <PageHeader
        title="Batches"
        description="Lots filled on the site's lines, newest first. Batch status changes through deviations and their disposition."
        actions={
          <Link href="/batches/sampling" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
            Re-inspection sampling plan
          </Link>
        }
      />
      <nav aria-label="Filter by status" className="mb-4">
        <ul className="flex flex-wrap gap-2">
          {filters.map((f) => {
            const current = f.status === query.status;
            return (
              <li key={f.label}>
                <Link
                  href={hrefFor(1, f.status)}
                  aria-current={current ? 'page' : undefined}
                  className={`inline-flex min-h-11 items-center rounded-full border px-4 font-semibold ${
                    current ? 'border-ink-900 bg-ink-900 text-white' : 'border-ink-400 bg-white hover:bg-ink-100'
                  }`}
                >
                  {f.label}
                </Link>
              </li>
            );
          })}
        </ul>
      </nav>

      <p className="mb-2 text-ink-600">
        {result.total === 0 ? (
          'No batches match.'
        ) : result.rows.length === 0 ? (
          <>
            There is no page {result.page}.{' '}
            <Link href={hrefFor(1, query.status)} className="font-semibold text-ink-900 underline underline-offset-4">
              Go to the first page
            </Link>
          </>
        ) : (
          `Showing ${count.format(first)}–${count.format(last)} of ${count.format(result.total)} batches`
        )}
      </p>

      {result.rows.length > 0 ? (
        <div className="overflow-x-auto rounded-lg border border-ink-200 bg-white">
          <table className="w-full min-w-[44rem] border-collapse text-left">
            <caption className="sr-only">
              Batches{query.status ? ` with status ${batchStatusLabels[query.status]}` : ''}, page {result.page}
            </caption>
            <thead className="bg-ink-100 text-sm text-ink-700">
              <tr>
                <th scope="col" className="px-4 py-3 font-semibold">Lot</th>
                <th scope="col" className="px-4 py-3 font-semibold">Product</th>
                <th scope="col" className="px-4 py-3 text-right font-semibold">Size (capsules)</th>
                <th scope="col" className="px-4 py-3 font-semibold">Status</th>
                <th scope="col" className="px-4 py-3 font-semibold">Manufactured on</th>
                <th scope="col" className="px-4 py-3 font-semibold">Keep records until</th>
              </tr>
            </thead>
            <tbody>
              {result.rows.map((b) => (
                <tr key={b.id} className="border-t border-ink-200">
                  <th scope="row" className="px-4 py-3 font-semibold whitespace-nowrap">
                    {b.lotNumber}
                  </th>
                  <td className="px-4 py-3">
                    <span className="block">
                      {b.productName} {b.strength}
                    </span>
                    <span className="block text-sm text-ink-600">{b.productCode}</span>
                  </td>
                  <td className="px-4 py-3 text-right tabular-nums">{count.format(b.sizeCapsules)}</td>
                  <td className="px-4 py-3">
                    <BatchStatusBadge status={b.status} />
                  </td>
                  <td className="px-4 py-3 whitespace-nowrap tabular-nums">{b.manufacturedOn}</td>
                  <td className="px-4 py-3">
                    <RetentionCell batch={b} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}

      <Pagination
        page={result.page}
        pageSize={result.pageSize}
        total={result.total}
        hrefFor={(p) => hrefFor(p, query.status)}
        label="Batch list pages"
      />
    </>
  );
}
