import { Notice } from '@/components/ui/notice';

/*
 * The steps this person's role takes at this stage but this record keeps from them, with the
 * reason the server would give (segregation of duties, a batch still without a disposition). The
 * page shows no button for them; this says why, in the same words (lib/records/kind.ts).
 */

export interface BlockedEventItem {
  type: string;
  reason: string;
}

export function BlockedEventList({ events, labels }: { events: readonly BlockedEventItem[]; labels: Record<string, string> }) {
  if (events.length === 0) return null;
  return (
    <div data-testid="blocked-events">
      <Notice tone="neutral" title="Not offered to you here" live={false}>
        <ul className="flex list-disc flex-col gap-1 pl-5">
          {events.map((e) => (
            <li key={e.type} data-testid={`blocked-${e.type}`}>
              <span className="font-semibold">{labels[e.type] ?? e.type}:</span> {e.reason}
            </li>
          ))}
        </ul>
      </Notice>
    </div>
  );
}
