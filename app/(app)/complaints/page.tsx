import type { Metadata } from 'next';
import { PlannedWork } from '@/components/ui/planned-work';
import { requirePageUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Complaints' };

export default async function ComplaintsPage() {
  await requirePageUser('complaint.read', { returnTo: '/complaints' });
  return (
    <PlannedWork
      title="Complaints"
      summary="Customer complaints, from receipt to the answer the customer gets."
      coming={[
        'Logging a complaint with the batch concerned.',
        'Assessment: category, whether it is an adverse event, reportability and its deadline.',
        'Investigation with retained samples and links to deviations and CAPA.',
        'The response to the customer, and closure.',
      ]}
    />
  );
}
