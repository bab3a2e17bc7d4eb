import { formatLongDate, type Retention } from '@/lib/clocks';

/*
 * Where a record is kept: how long it must be kept and the rule that says so. Other screens
 * (batch, complaint) show it with the Retention computed by lib/clocks/retention.
 */
export function RetentionNote({ retention, what }: { retention: Retention; what: string }) {
  return (
    <div className="rounded-md border border-ink-200 bg-ink-50 px-4 py-3">
      <p className="font-semibold text-ink-900">
        Keep {what} until at least {formatLongDate(retention.retainUntil)}
      </p>
      <p className="text-sm text-ink-700">
        {retention.rule} <span className="whitespace-nowrap">({retention.citation})</span>
      </p>
    </div>
  );
}
