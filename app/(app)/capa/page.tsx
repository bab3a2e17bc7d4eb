import type { Metadata } from 'next';
import Link from 'next/link';
import { CapaTable } from '@/components/capa/capa-table';
import { buttonClasses } from '@/components/ui/button';
import { PageHeader } from '@/components/ui/page-header';
import { can } from '@/lib/auth/permissions';
import { requirePageUser } from '@/lib/auth/session';
import { capaListSearch, parseCapaListQuery } from '@/lib/capa/list-query';
import { listCapaOwners, listCapas } from '@/lib/capa/queries';

export const metadata: Metadata = { title: 'CAPA' };

export default async function CapaPage({ searchParams }: PageProps<'/capa'>) {
  const query = parseCapaListQuery(await searchParams);
  const search = capaListSearch(query);
  const user = await requirePageUser('capa.read', { returnTo: search ? `/capa?${search}` : '/capa' });
  const [firstPage, owners] = await Promise.all([listCapas(query, user), listCapaOwners()]);
  return (
    <>
      <PageHeader
        title="CAPA"
        description="Corrective and preventive actions raised from deviations, complaints and trends, and the evidence that they worked. Newest first unless you sort otherwise."
        actions={
          can(user, 'capa.create') ? (
            <Link href="/capa/new" className={buttonClasses('primary')}>
              Open a CAPA
            </Link>
          ) : null
        }
      />
      {/* A new URL from outside the list (a nav link, a bookmark) starts the table afresh. */}
      <CapaTable key={search} initialQuery={query} initialPage={firstPage} owners={owners} />
    </>
  );
}
