import Link from 'next/link';
import { DeviationStatusBadge } from '@/components/deviations/detail-badges';
import type { DeviationRowDto } from '@/lib/deviations/queries';

/*
 * The batch's deviations beside the complaint: those on the same lot, the same filler and the same
 * filling ring, newest first, so the investigator sees at once whether the plant already knew.
 */

function List({ title, rows, empty }: { title: string; rows: DeviationRowDto[]; empty: string }) {
  return (
    <section className="min-w-0 rounded-md border border-ink-200 p-3">
      <h4 className="font-semibold">{title}</h4>
      {rows.length === 0 ? (
        <p className="mt-1 text-sm text-ink-600">{empty}</p>
      ) : (
        <ul className="mt-2 flex flex-col gap-2 text-sm">
          {rows.map((d) => (
            <li key={d.id} className="flex flex-col gap-1">
              <Link href={`/deviations/${d.id}`} className="font-semibold underline underline-offset-4">
                {d.number ?? `#${d.id}`}
              </Link>
              <span>{d.title}</span>
              <span className="flex flex-wrap items-center gap-2 text-ink-600">
                <DeviationStatusBadge status={d.status} />
                {d.defect ?? 'no defect named'} · {d.raisedAt.slice(0, 10)}
                {d.lot ? ` · ${d.lot}` : ''}
              </span>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

export function BatchDeviations({
  lists,
  lot,
  machine,
  ring,
}: {
  lists: { sameLot: DeviationRowDto[]; sameMachine: DeviationRowDto[]; sameRing: DeviationRowDto[] };
  lot: string;
  machine: string | null;
  ring: string | null;
}) {
  return (
    <div className="grid grid-cols-1 gap-3 lg:grid-cols-3" data-testid="batch-deviations">
      <List title={`Lot ${lot}`} rows={lists.sameLot} empty="No deviation on this lot." />
      <List title={machine ? `Filler ${machine}` : 'Filler'} rows={lists.sameMachine} empty={machine ? 'No deviation on this filler.' : 'The batch record names no filler.'} />
      <List title={ring ? `Ring ${ring}` : 'Filling ring'} rows={lists.sameRing} empty={ring ? 'No deviation on this ring.' : 'The batch record names no ring.'} />
    </div>
  );
}
