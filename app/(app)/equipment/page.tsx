import type { Metadata } from 'next';
import Link from 'next/link';
import { RingConditionBadge, RingStatusBadge } from '@/components/equipment/ring-badges';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { type MachineWithRingsDto, listMachinesByRoom } from '@/lib/equipment/queries';

export const metadata: Metadata = { title: 'Equipment' };

function RingCounts({ machine }: { machine: MachineWithRingsDto }) {
  const { in_service, quarantined, retired } = machine.ringCounts;
  return (
    <p className="text-sm text-ink-700">
      {in_service} in service · {quarantined} quarantined · {retired} retired
    </p>
  );
}

function MachineSection({ machine, showRetired }: { machine: MachineWithRingsDto; showRetired: boolean }) {
  const headingId = `machine-${machine.id}`;
  return (
    <section aria-labelledby={headingId} className="rounded-lg border border-ink-200 bg-white p-5">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 id={headingId} className="text-lg font-semibold">
          {machine.name} <span className="font-normal text-ink-600">({machine.assetTag})</span>
        </h3>
        {machine.active ? null : <span className="text-sm font-semibold text-ink-600">Inactive</span>}
      </div>
      <p className="text-sm text-ink-700">
        {machine.model} · change parts for sizes {machine.capsuleSizes.join(', ')}
      </p>
      <RingCounts machine={machine} />
      {machine.rings.length === 0 ? (
        <p className="mt-3 text-ink-600">{showRetired ? 'No filling rings registered.' : 'No filling rings in service or quarantine.'}</p>
      ) : (
        <div className="mt-3 overflow-x-auto">
          <table className="w-full min-w-[36rem] border-collapse text-left">
            <caption className="sr-only">Filling rings of {machine.name}</caption>
            <thead>
              <tr className="border-b border-ink-300 text-sm text-ink-600">
                <th scope="col" className="py-2 pr-4 font-semibold">
                  Ring
                </th>
                <th scope="col" className="py-2 pr-4 font-semibold">
                  Size
                </th>
                <th scope="col" className="py-2 pr-4 font-semibold">
                  Condition
                </th>
                <th scope="col" className="py-2 pr-4 font-semibold">
                  Status
                </th>
                <th scope="col" className="py-2 font-semibold">
                  Reason
                </th>
              </tr>
            </thead>
            <tbody>
              {machine.rings.map((ring) => (
                <tr key={ring.id} className="border-b border-ink-100 align-top">
                  <th scope="row" className="py-1 pr-4 font-normal">
                    <Link
                      href={`/equipment/rings/${ring.id}`}
                      className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4"
                    >
                      {ring.serial}
                    </Link>
                  </th>
                  <td className="py-3 pr-4">{ring.capsuleSize}</td>
                  <td className="py-3 pr-4">
                    <RingConditionBadge condition={ring.condition} />
                  </td>
                  <td className="py-3 pr-4">
                    <RingStatusBadge status={ring.status} />
                  </td>
                  <td className="py-3 text-ink-800">{ring.statusReason ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}

export default async function EquipmentPage({ searchParams }: PageProps<'/equipment'>) {
  const showRetired = (await searchParams).retired === 'show';
  const user = await requirePageUser('equipment.read', { returnTo: showRetired ? '/equipment?retired=show' : '/equipment' });
  const rooms = await listMachinesByRoom(user, { includeRetired: showRetired });

  return (
    <>
      <PageHeader
        title="Equipment"
        description="Filling machines by room, with their filling rings. Open a ring to quarantine it, return it to service or retire it."
        actions={
          <>
            <Link
              href="/equipment/causes"
              className="inline-flex min-h-11 items-center rounded-md border border-ink-400 bg-white px-4 font-semibold hover:bg-ink-100"
            >
              Probable causes of defects
            </Link>
            <Link
              href={showRetired ? '/equipment' : '/equipment?retired=show'}
              className="inline-flex min-h-11 items-center rounded-md border border-ink-400 bg-white px-4 font-semibold hover:bg-ink-100"
            >
              {showRetired ? 'Hide retired rings' : 'Show retired rings'}
            </Link>
          </>
        }
      />
      {rooms.length === 0 ? (
        <p className="text-ink-600">No machines are registered yet. An administrator adds them under master data.</p>
      ) : (
        <div className="flex flex-col gap-8">
          {rooms.map((room) => (
            <section key={room.room} aria-labelledby={`room-${room.room}`} className="flex flex-col gap-4">
              <h2 id={`room-${room.room}`} className="text-xl font-bold tracking-tight">
                {room.room}
              </h2>
              {room.machines.map((m) => (
                <MachineSection key={m.id} machine={m} showRetired={showRetired} />
              ))}
            </section>
          ))}
        </div>
      )}
    </>
  );
}
