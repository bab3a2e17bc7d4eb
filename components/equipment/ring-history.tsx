import { formatUtc } from '@/components/ui/format';
import type { HistoryEntryDto } from '@/lib/records/trail';

/* The ring's lifecycle, newest first: what happened, from which state to which, who, when, why. */

export function RingHistory({ entries }: { entries: readonly HistoryEntryDto[] }) {
  if (entries.length === 0) return <p className="text-ink-600">No lifecycle changes recorded yet.</p>;
  return (
    <ol className="relative flex flex-col gap-4 border-l-2 border-ink-200 pl-5">
      {entries.map((h) => (
        <li key={h.id} className="relative">
          <span aria-hidden="true" className="absolute top-1.5 -left-[27px] h-3 w-3 rounded-full border-2 border-ink-600 bg-white" />
          <p className="font-semibold">
            {h.eventLabel}
            <span className="font-normal text-ink-700">
              {' '}
              — {h.fromLabel ? `${h.fromLabel} → ` : ''}
              {h.toLabel}
            </span>
          </p>
          <p className="text-sm text-ink-600">
            {formatUtc(h.at, true)} · {h.userName}
          </p>
          {h.comment ? <p className="mt-1 text-ink-800">{h.comment}</p> : null}
        </li>
      ))}
    </ol>
  );
}
