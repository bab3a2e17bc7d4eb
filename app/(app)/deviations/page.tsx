import type { Metadata } from 'next';
import Link from 'next/link';
import { PlannedWork } from '@/components/ui/planned-work';
import { can } from '@/lib/auth/permissions';
import { requirePageUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Deviations' };

export default async function DeviationsPage() {
  const user = await requirePageUser('deviation.read', { returnTo: '/deviations' });
  return (
    <>
      <PlannedWork
        title="Deviations"
        summary="Departures from the approved procedure on the filling lines, from the first report to closure."
        coming={[
          'Raising a deviation from the line in under a minute: batch, machine, filling ring, capsule defect, count, photos and the action taken at once.',
          'Containment by the supervisor: line stopped, batches put on hold.',
          'Triage by QA: classification, risk score and due date; minor deviations can close here with a justification.',
          'Investigation to a root cause, with the impact on other batches.',
          'Approval with an electronic signature, and a disposition for every batch put on hold.',
        ]}
      />
      {can(user, 'risk.score') ? (
        <p className="mt-6 max-w-3xl">
          <Link href="/deviations/risk" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
            Risk scoring: score a capsule defect for severity, occurrence and detection →
          </Link>
        </p>
      ) : null}
    </>
  );
}
