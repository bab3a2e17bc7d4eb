import type { Metadata } from 'next';
import { PlannedWork } from '@/components/ui/planned-work';
import { requirePageUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'CAPA' };

export default async function CapaPage() {
  await requirePageUser('capa.read', { returnTo: '/capa' });
  return (
    <PlannedWork
      title="CAPA"
      summary="Corrective and preventive actions, and the proof that they worked."
      coming={[
        'A CAPA raised from a deviation, a complaint or a trend.',
        'A plan approved by QA, with actions that each have an owner, a due date and evidence.',
        'An effectiveness check against criteria set in advance: closed as effective, or back to planning.',
      ]}
    />
  );
}
