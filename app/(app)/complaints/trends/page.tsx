import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden } from 'next/navigation';
import { TrendChart } from '@/components/complaints/trend-chart';
import { CategoryTable, LotTable, ProductTable } from '@/components/complaints/trend-tables';
import { buttonClasses } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { canReadTrends, getComplaintTrends, getTrendToday } from '@/lib/complaints/trending';
import { type TrendRange, defaultTrendRange, maxTrendMonths, monthLabel, parseTrendRange } from '@/lib/complaints/trending-math';
import { ValidationError } from '@/lib/errors';

export const metadata: Metadata = { title: 'Complaint trends' };

const count = new Intl.NumberFormat('en-US');

function first(v: string | string[] | undefined): string | undefined {
  return Array.isArray(v) ? v[0] : v;
}

function Figure({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="flex flex-col rounded-md border border-ink-200 bg-white px-4 py-3">
      <dt className="text-sm text-ink-600">{label}</dt>
      <dd className="text-2xl font-bold tabular-nums text-ink-900">{value}</dd>
      {note ? <dd className="text-sm text-ink-600">{note}</dd> : null}
    </div>
  );
}

export default async function ComplaintTrendsPage({ searchParams }: PageProps<'/complaints/trends'>) {
  const params = await searchParams;
  const typed = { from: first(params.from) ?? '', to: first(params.to) ?? '' };
  const search = new URLSearchParams(Object.entries(typed).filter(([, v]) => v !== '')).toString();
  const user = await requirePageUser('complaint.read', { returnTo: search ? `/complaints/trends?${search}` : '/complaints/trends' });
  if (!canReadTrends(user)) forbidden();

  const site = await getTrendToday();
  let range: TrendRange;
  let fieldErrors: Record<string, string[]> = {};
  try {
    range = parseTrendRange(typed, site.today);
  } catch (err) {
    if (!(err instanceof ValidationError)) throw err;
    fieldErrors = err.fieldErrors;
    range = defaultTrendRange(site.today);
  }
  const trends = await getComplaintTrends(range, site);
  const { totals } = trends;
  const hasErrors = Object.keys(fieldErrors).length > 0;

  return (
    <>
      <PageHeader
        title="Complaint trends"
        description={`Complaints per million units shipped, by month, category, product and lot: ${monthLabel(range.from)} to ${monthLabel(range.to)}.`}
        actions={
          <Link href="/complaints" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
            All complaints
          </Link>
        }
      />

      <div className="flex flex-col gap-6">
        <Notice tone="info" title="Trends support the complaint review; they do not replace it" live={false}>
          Each complaint is still reviewed, assessed and, where warranted, investigated on its own under the site’s complaint procedure (21 CFR 211.198,
          21 CFR 111.560, EU GMP Chapter 8). A month above its limit or a repeat lot is a prompt to look for a common cause, not a finding.
        </Notice>

        <form method="get" action="/complaints/trends" className="flex flex-wrap items-start gap-4 rounded-lg border border-ink-200 bg-white p-4" aria-label="Months to show">
          {(['from', 'to'] as const).map((name) => {
            const errors = fieldErrors[name];
            return (
              <div key={name} className="w-52">
                {/* A month input cannot show a value it does not understand, so a refused one comes back as text. */}
                <TextField
                  name={name}
                  label={name === 'from' ? 'From month' : 'To month'}
                  type={errors ? 'text' : 'month'}
                  placeholder="YYYY-MM"
                  hint="YYYY-MM"
                  defaultValue={typed[name] || range[name]}
                  errors={errors}
                />
              </div>
            );
          })}
          <div className="flex basis-full flex-wrap gap-2">
            <button type="submit" className={buttonClasses('primary')}>
              Show these months
            </button>
            <Link href="/complaints/trends" className={buttonClasses('quiet')}>
              Last 12 months
            </Link>
          </div>
          <p className="basis-full text-sm text-ink-600">
            Up to {maxTrendMonths} months. Months follow the site’s calendar ({trends.timeZone}); today is {trends.today}.
          </p>
        </form>
        {hasErrors ? (
          <Notice tone="danger" title="Those months could not be used">
            The figures below are for the last 12 months. Correct the months above and show them again.
          </Notice>
        ) : null}

        <section aria-labelledby="trend-summary" className="flex flex-col gap-3">
          <h2 id="trend-summary" className="text-xl font-bold">
            Summary
          </h2>
          <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-5">
            <Figure label="Complaints received" value={count.format(totals.complaints)} />
            <Figure label="Units shipped" value={count.format(totals.units)} note={`${totals.lotsMade} lots made in these months`} />
            <Figure
              label="Per million units"
              value={totals.ratePerMillion === null ? '—' : totals.ratePerMillion.toFixed(2)}
              note={totals.ratePerMillion === null ? 'No units shipped on record' : undefined}
            />
            <Figure label="Repeat lots" value={String(trends.repeatLots)} note="more than one complaint" />
            <Figure label="Months above limit" value={String(totals.signalMonths)} />
          </dl>
          {totals.complaints === 0 ? (
            <p className="text-ink-700">No complaints were received in these months. The chart and tables fill in as complaints are logged.</p>
          ) : null}
        </section>

        <section aria-labelledby="trend-months" className="flex flex-col gap-3">
          <h2 id="trend-months" className="text-xl font-bold">
            By month
          </h2>
          <TrendChart months={trends.months} />
        </section>

        <div className="flex flex-col gap-6">
          <section aria-labelledby="trend-categories" className="flex flex-col gap-3">
            <h2 id="trend-categories" className="text-xl font-bold">
              By category
            </h2>
            <p className="text-sm text-ink-700">Each rate is against every unit shipped from the lots made in these months.</p>
            <CategoryTable trends={trends} />
          </section>
          <section aria-labelledby="trend-products" className="flex flex-col gap-3">
            <h2 id="trend-products" className="text-xl font-bold">
              By product
            </h2>
            <p className="text-sm text-ink-700">A complaint naming only a lot counts for that lot’s product; rates are against the product’s lots made in these months.</p>
            <ProductTable trends={trends} />
          </section>
        </div>

        <section aria-labelledby="trend-lots" className="flex flex-col gap-3">
          <h2 id="trend-lots" className="text-xl font-bold">
            By lot
          </h2>
          <p className="text-sm text-ink-700">
            Lots with a complaint in these months. “Complaints (all)” counts every complaint the lot has had, whenever received; a lot with more than one is
            flagged as a repeat lot, and its rate is against the lot’s own units shipped.
          </p>
          <LotTable trends={trends} />
        </section>

        <details className="rounded-md border border-ink-200 bg-white p-3 text-sm text-ink-700">
          <summary className="min-h-11 cursor-pointer py-2 font-semibold text-ink-900">How the rates are worked out</summary>
          <ul className="mt-2 flex list-disc flex-col gap-1 pl-5">
            <li>Rate per million = complaints ÷ units shipped × 1,000,000, to two decimals. Units shipped come from each lot’s batch record.</li>
            <li>
              The batch record says how many units of a lot went out, not when; the month a lot was made stands in for the month it shipped. Complaints count
              in the month they were received.
            </li>
            <li>A complaint received in these months may be about a lot made earlier; over a year the difference is small next to the counts.</li>
            <li>
              A month’s limit is ū + 3√(ū/n): ū is the rate over the previous six months with units on record, n the month’s units in millions (u-chart;
              Montgomery, <cite>Introduction to Statistical Quality Control</cite>). It needs at least three such months and at least one complaint in them.
            </li>
            <li>Complaints not yet assessed have no category yet and show as “Not yet assessed”; none is left out.</li>
          </ul>
        </details>
      </div>
    </>
  );
}
