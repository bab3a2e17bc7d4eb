import type { Metadata } from 'next';
import Link from 'next/link';
import { RiskScoringWorkbench } from '@/components/risk/risk-scoring-workbench';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { getCurrentRiskScales, listScoringDefects } from '@/lib/risk-scales/queries';

export const metadata: Metadata = { title: 'Risk scoring' };

export default async function RiskScoringPage() {
  await requirePageUser('risk.score', { returnTo: '/deviations/risk' });
  const [scales, defects] = await Promise.all([getCurrentRiskScales(), listScoringDefects()]);
  return (
    <>
      <p className="mb-2">
        <Link href="/deviations" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Deviations
        </Link>
      </p>
      <PageHeader
        title="Risk scoring"
        description="Score a capsule defect for severity, occurrence and detection and see its risk priority number, action priority, place on the risk matrix and classification. Nothing on this page is saved; the score is recorded when a deviation is triaged."
      />
      {scales ? (
        <RiskScoringWorkbench defects={defects} scales={scales.scales} scaleVersion={scales.version} />
      ) : (
        <Notice tone="warn" title="No risk scales are published yet" live={false}>
          An administrator publishes the first version under Admin → Risk scales.
        </Notice>
      )}
    </>
  );
}
