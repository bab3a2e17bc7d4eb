import type { Metadata } from 'next';
import { PlannedWork } from '@/components/ui/planned-work';
import { requirePageUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Weight checks' };

export default async function WeightChecksPage() {
  await requirePageUser('weight_check.read', { returnTo: '/weight-checks' });
  return (
    <PlannedWork
      title="Weight checks"
      summary="In-process fill weights of capsule samples, checked against the product's limits."
      coming={[
        'Recording the weights of a capsule sample at the line.',
        'Uniformity of mass against the pharmacopoeial rules, with mean, standard deviation, RSD, minimum, maximum and the count outside limits.',
        'Capability and control-chart rules across the checks of a batch.',
        'From a failed check, a deviation prefilled with the results.',
      ]}
    />
  );
}
