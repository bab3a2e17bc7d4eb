import type { Metadata } from 'next';
import Link from 'next/link';
import { PublishScalesForm } from '@/components/risk/publish-scales-form';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { getCurrentRiskScales } from '@/lib/risk-scales/queries';
import { defaultRiskScales } from '@/lib/risk/scales';
import { riskScalesToFields } from '@/lib/validation/risk';
import { publishRiskScalesAction } from '../actions';

export const metadata: Metadata = { title: 'Publish risk scales' };

export default async function PublishRiskScalesPage() {
  await requirePageUser('risk.manage_scales', { returnTo: '/admin/risk-scales/publish' });
  const current = await getCurrentRiskScales();
  const basedOnVersion = current?.version ?? 0;
  return (
    <>
      <p className="mb-2">
        <Link href="/admin/risk-scales" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Risk scales
        </Link>
      </p>
      <PageHeader
        title={`Publish version ${basedOnVersion + 1} of the risk scales`}
        description={
          current
            ? `Starts from version ${current.version}. Change the wording of any step and say why; version ${current.version} stays as it is for the scores made with it.`
            : 'Starts from Plumbline’s default wording. Review it against the site’s controls before publishing.'
        }
      />
      <PublishScalesForm
        action={publishRiskScalesAction}
        basedOnVersion={basedOnVersion}
        initialValues={riskScalesToFields(current?.scales ?? defaultRiskScales)}
      />
    </>
  );
}
