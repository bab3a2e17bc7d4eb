import type { Metadata } from 'next';
import { RaiseForm } from '@/components/deviations/raise-form';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { listDefectOptions, listMachineOptions, listRingOptions, searchRaisableBatches } from '@/lib/deviations/raise-options';
import { findHoldCandidates, findRaisableLots, saveRaiseDraft, submitRaisedDeviation } from './actions';

export const metadata: Metadata = { title: 'Raise a deviation' };

export default async function RaiseDeviationPage() {
  await requirePageUser('deviation.raise', { returnTo: '/deviations/new' });
  const [defects, machines, rings, recentBatches] = await Promise.all([
    listDefectOptions(),
    listMachineOptions(),
    listRingOptions(),
    searchRaisableBatches('', { limit: 30 }),
  ]);
  return (
    <>
      <PageHeader title="Raise a deviation" description="Three short steps. Your draft is saved at each step and kept on this tablet if the connection drops." />
      <RaiseForm
        defects={defects}
        machines={machines}
        rings={rings}
        recentBatches={recentBatches}
        saveDraft={saveRaiseDraft}
        submit={submitRaisedDeviation}
        findLots={findRaisableLots}
        findHoldCandidates={findHoldCandidates}
      />
    </>
  );
}
