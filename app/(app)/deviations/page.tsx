import type { Metadata } from 'next';
import Link from 'next/link';
import { DeviationTable } from '@/components/deviations/deviation-table';
import { deviationListSearch } from '@/components/deviations/list-query';
import { buttonClasses } from '@/components/ui/button';
import { PageHeader } from '@/components/ui/page-header';
import { can } from '@/lib/auth/permissions';
import { requirePageUser } from '@/lib/auth/session';
import { listDeviationListOptions } from '@/lib/deviations/list-options';
import { listDeviations } from '@/lib/deviations/queries';
import { deviationListDefaults, parseDeviationListQuery } from '@/lib/validation/deviation-list';

export const metadata: Metadata = { title: 'Deviations' };

export default async function DeviationsPage({ searchParams }: PageProps<'/deviations'>) {
  const query = parseDeviationListQuery(await searchParams);
  const search = deviationListSearch(query, deviationListDefaults);
  const user = await requirePageUser('deviation.read', { returnTo: search ? `/deviations?${search}` : '/deviations' });
  const [firstPage, options] = await Promise.all([listDeviations(query, user), listDeviationListOptions(user)]);

  return (
    <>
      <PageHeader
        title="Deviations"
        description="Departures from the approved procedure on the filling lines, from the first report to closure. Newest first unless you sort otherwise."
        actions={
          <>
            {can(user, 'risk.score') ? (
              <Link href="/deviations/risk" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
                Risk scoring
              </Link>
            ) : null}
            {can(user, 'deviation.raise') ? (
              <Link href="/deviations/new" className={buttonClasses('primary')}>
                Raise a deviation
              </Link>
            ) : null}
          </>
        }
      />
      {/* A new URL from outside the list (a nav link, a bookmark) starts the table afresh. */}
      <DeviationTable key={search} initialQuery={query} initialPage={firstPage} defaults={deviationListDefaults} options={options} />
    </>
  );
}
