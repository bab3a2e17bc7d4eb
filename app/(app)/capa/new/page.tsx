import type { Metadata } from 'next';
import Link from 'next/link';
import { NewCapaForm } from '@/components/capa/new-capa-form';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { getCapaPlanOptions } from '@/lib/capa/detail';
import { openCapa } from './actions';

export const metadata: Metadata = { title: 'Open a CAPA' };

export default async function NewCapaPage() {
  await requirePageUser('capa.create', { returnTo: '/capa/new' });
  const options = await getCapaPlanOptions();
  return (
    <>
      <p className="mb-2">
        <Link href="/capa" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← CAPA
        </Link>
      </p>
      <PageHeader
        title="Open a CAPA"
        description="For a trend, or a deviation or complaint that needs one. A deviation whose investigation says a CAPA is needed opens it by itself."
      />
      <NewCapaForm action={openCapa} owners={options.owners} />
    </>
  );
}
