import type { Metadata } from 'next';
import { buttonClasses } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { StatusBadge } from '@/components/ui/status-badge';
import { FillPlanningLine } from '@/components/weight/fill-planning-line';
import { RecentChecks } from '@/components/weight/recent-checks';
import { WeightCheckForm } from '@/components/weight/weight-check-form';
import { XBarRChart } from '@/components/weight/xbar-r-chart';
import { can } from '@/lib/auth/permissions';
import { requirePageUser } from '@/lib/auth/session';
import { getProductTappedDensity, getWeightBatchByLot, listBatchWeightChecks, listOpenLots } from '@/lib/weight-checks/queries';
import { batchStatusesTakingChecks } from '@/lib/weight-checks/types';
import { cpk, xBarRChart } from '@/lib/weight';
import { submitWeightCheck } from './actions';

export const metadata: Metadata = { title: 'Weight checks' };

const statusLabel = { in_process: 'In process', on_hold: 'On hold', released: 'Released', rejected: 'Rejected' } as const;

export default async function WeightChecksPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) ?? '';
  const lot = first(params.lot).trim().slice(0, 40);
  const recorded = first(params.recorded);
  const user = await requirePageUser('weight_check.read', {
    returnTo: lot ? `/weight-checks?lot=${encodeURIComponent(lot)}` : '/weight-checks',
  });
  const [batch, openLots] = await Promise.all([lot ? getWeightBatchByLot(lot) : null, listOpenLots()]);
  const [checks, tappedDensity] = batch
    ? await Promise.all([listBatchWeightChecks(batch.id), getProductTappedDensity(batch.product.id)])
    : [[], null];
  const chart = xBarRChart(checks.map((c) => ({ label: c.checkedAt, values: c.netMassesMg })));
  const chartLabels = checks.map((c) => `${c.checkedAt.slice(5, 10)} ${c.checkedAt.slice(11, 16)}`);
  const takesChecks = batch !== null && (batchStatusesTakingChecks as readonly string[]).includes(batch.status);

  return (
    <>
      <PageHeader
        title="Weight checks"
        description="Uniformity of mass of a capsule sample at the line, against the pharmacopoeia and the product's own limits."
      />
      <form method="get" className="mb-6 flex flex-wrap items-end gap-3" role="search">
        <div className="flex flex-col gap-1">
          <label htmlFor="lot" className="font-semibold text-ink-900">
            Lot number
          </label>
          <input
            id="lot"
            name="lot"
            defaultValue={lot}
            list="open-lots"
            autoComplete="off"
            placeholder="BW-2026-1120-A"
            className="block min-h-11 w-72 rounded-md border border-ink-400 bg-white px-3 py-2 font-mono text-base"
          />
          <datalist id="open-lots">
            {openLots.map((l) => (
              <option key={l.lotNumber} value={l.lotNumber}>
                {l.productName}
              </option>
            ))}
          </datalist>
        </div>
        <button type="submit" className={buttonClasses('secondary')}>
          Open batch
        </button>
      </form>

      {lot && !batch ? (
        <Notice tone="warn" title="No batch with that lot number">
          Check the lot number on the batch record; lots read like BW-2026-1120-A.
        </Notice>
      ) : null}
      {!lot ? (
        <Notice tone="info" live={false}>
          Type the lot number of the batch on the line (the list suggests batches in process).
        </Notice>
      ) : null}

      {batch ? (
        <div className="flex flex-col gap-8">
          <section aria-labelledby="batch-heading" className="rounded-md border border-ink-200 bg-white p-4">
            <h2 id="batch-heading" className="flex flex-wrap items-center gap-3 text-xl font-bold text-ink-900">
              <span className="font-mono">{batch.lotNumber}</span>
              <StatusBadge tone={takesChecks ? 'info' : 'neutral'} label={statusLabel[batch.status]} />
            </h2>
            <dl className="mt-3 grid gap-x-6 gap-y-2 sm:grid-cols-2 lg:grid-cols-4">
              <div>
                <dt className="text-sm text-ink-600">Product</dt>
                <dd className="font-semibold">
                  {batch.product.name} ({batch.product.code}), size {batch.product.capsuleSize}, {batch.product.regulatoryClass}
                </dd>
              </div>
              <div>
                <dt className="text-sm text-ink-600">Fill target and limits</dt>
                <dd className="font-semibold tabular-nums">
                  {batch.product.targetFillMg.toFixed(1)} mg ({batch.product.fillLowerMg.toFixed(1)}–{batch.product.fillUpperMg.toFixed(1)} mg)
                </dd>
              </div>
              <div>
                <dt className="text-sm text-ink-600">Machine</dt>
                <dd className="font-semibold">{batch.machine ? `${batch.machine.assetTag} · ${batch.machine.name}` : '—'}</dd>
              </div>
              <div>
                <dt className="text-sm text-ink-600">Filling ring</dt>
                <dd className="font-semibold">{batch.ring?.serial ?? '—'}</dd>
              </div>
            </dl>
            <div className="mt-4 border-t border-ink-200 pt-3">
              <FillPlanningLine product={batch.product} tappedDensityGPerMl={tappedDensity} />
            </div>
          </section>

          {recorded ? (
            <Notice tone="ok" title="Check recorded">
              The check is saved with an entry in the audit trail; it is in the list below.
            </Notice>
          ) : null}

          {takesChecks ? (
            <section aria-labelledby="new-check-heading" className="flex flex-col gap-4">
              <h2 id="new-check-heading" className="text-xl font-bold text-ink-900">
                New check
              </h2>
              <WeightCheckForm key={recorded || 'new'} batch={batch} action={submitWeightCheck} canRecord={can(user, 'weight_check.record')} />
            </section>
          ) : (
            <Notice tone="info" live={false}>
              This batch is {statusLabel[batch.status].toLowerCase()}: in-process weight checks are recorded while a batch is in process or on hold.
            </Notice>
          )}

          <section id="checks" aria-labelledby="checks-heading" className="flex flex-col gap-4">
            <h2 id="checks-heading" className="text-xl font-bold text-ink-900">
              Checks of this batch
            </h2>
            <RecentChecks checks={checks} />
            {chart ? (
              <XBarRChart
                chart={chart}
                labels={chartLabels}
                cpk={cpk(chart.grandMean, chart.sigma, batch.product.fillLowerMg, batch.product.fillUpperMg)}
              />
            ) : null}
          </section>
        </div>
      ) : null}
    </>
  );
}
