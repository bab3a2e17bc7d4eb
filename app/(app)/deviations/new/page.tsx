import type { Metadata } from 'next';
import { RaiseForm } from '@/components/deviations/raise-form';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { listDefectOptions, listMachineOptions, listRingOptions, searchRaisableBatches } from '@/lib/deviations/raise-options';
import { findHoldCandidates, findRaisableLots, saveRaiseDraft, submitRaisedDeviation } from './actions';

export const metadata: Metadata = { title: 'Raise a deviation' };

const one = (v: string | string[] | undefined) => (typeof v === 'string' ? v : undefined);

/*
 * ?lot=&defect=&what= fill a new deviation from elsewhere (a failed weight check). Only facts the
 * server can confirm are used: a lot it can raise on, a defect code from the catalogue; the text is
 * a suggestion the operator edits.
 */
export default async function RaiseDeviationPage({ searchParams }: PageProps<'/deviations/new'>) {
  await requirePageUser('deviation.raise', { returnTo: '/deviations/new' });
  const query = await searchParams;
  const lot = one(query.lot)?.trim().slice(0, 60);
  const [defects, machines, rings, recentBatches, lotMatches] = await Promise.all([
    listDefectOptions(),
    listMachineOptions(),
    listRingOptions(),
    searchRaisableBatches('', { limit: 30 }),
    lot ? searchRaisableBatches(lot, { limit: 5 }) : Promise.resolve([]),
  ]);
  const batch = lotMatches.find((b) => b.lotNumber.toUpperCase() === lot?.toUpperCase()) ?? null;
  const defect = defects.find((d) => d.code === one(query.defect)) ?? null;
  const what = one(query.what)?.slice(0, 2000);
  const prefill = batch || defect || what ? { batch, defectId: defect?.id ?? null, whatHappened: what ?? '' } : null;
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
        prefill={prefill}
      />
    </>
  );
}
