import type { Metadata } from 'next';
import Link from 'next/link';
import { ComplaintTable } from '@/components/complaints/complaint-table';
import { buttonClasses } from '@/components/ui/button';
import { PageHeader } from '@/components/ui/page-header';
import { can } from '@/lib/auth/permissions';
import { requirePageUser } from '@/lib/auth/session';
import { complaintListSearch, parseComplaintListQuery } from '@/lib/complaints/list-query';
import { listCategoryOptions, listComplaints, listProductOptions } from '@/lib/complaints/queries';
import { canReadTrends } from '@/lib/complaints/trending';

export const metadata: Metadata = { title: 'Complaints' };

export default async function ComplaintsPage({ searchParams }: PageProps<'/complaints'>) {
  const query = parseComplaintListQuery(await searchParams);
  const search = complaintListSearch(query);
  const user = await requirePageUser('complaint.read', { returnTo: search ? `/complaints?${search}` : '/complaints' });
  const [firstPage, products, categories] = await Promise.all([listComplaints(query, user), listProductOptions(), listCategoryOptions()]);
  return (
    <>
      <PageHeader
        title="Complaints"
        description={
          user.role === 'operator'
            ? 'The complaints you took down for callers. QA assesses, investigates and answers each one.'
            : 'Customer complaints from receipt to the answer, with the report deadline where one runs. Newest first unless you sort otherwise.'
        }
        actions={
          <>
            {canReadTrends(user) ? (
              <Link href="/complaints/trends" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
                Trends
              </Link>
            ) : null}
            {can(user, 'complaint.intake') ? (
              <Link href="/complaints/new" className={buttonClasses('primary')}>
                Take down a complaint
              </Link>
            ) : null}
          </>
        }
      />
      <ComplaintTable key={search} initialQuery={query} initialPage={firstPage} products={products} categories={[...categories.defects, ...categories.other]} />
    </>
  );
}
