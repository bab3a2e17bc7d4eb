import { formatUtc } from '@/components/ui/format';

/* A read-only list of audit entries: who, when (UTC), what, from what to what, and why. */

export interface AuditEntryView {
  id: number;
  at: string;
  userName: string;
  action: string;
  changes: { field: string; from: unknown; to: unknown }[];
  reason: string | null;
}

const fieldLabels: Record<string, string> = {
  email: 'E-mail',
  name: 'Name',
  title: 'Title',
  role: 'Role',
  active: 'Active',
  lockedUntil: 'Locked until',
  locked_until: 'Locked until',
  failedSignins: 'Failed attempts',
  failed_signins: 'Failed attempts',
};

const show = (v: unknown): string => {
  if (v === null || v === undefined || v === '') return '(empty)';
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (typeof v === 'string' && /^\d{4}-\d{2}-\d{2}T/.test(v)) return formatUtc(v);
  return String(v);
};

const actionLabel = (action: string) => action.replace(/_/g, ' ').replace(/^./, (c) => c.toUpperCase());

export function AuditTrail({ entries }: { entries: readonly AuditEntryView[] }) {
  if (entries.length === 0) return <p className="text-ink-600">No entries yet.</p>;
  return (
    <ol className="flex flex-col divide-y divide-ink-200 rounded-lg border border-ink-200 bg-white">
      {entries.map((e) => (
        <li key={e.id} className="flex flex-col gap-1 px-4 py-3">
          <p className="flex flex-wrap gap-x-3">
            <span className="font-semibold">{actionLabel(e.action)}</span>
            <span className="text-ink-600">
              {formatUtc(e.at, true)} · {e.userName}
            </span>
          </p>
          {e.changes.length > 0 ? (
            <ul className="text-sm text-ink-800">
              {e.changes.map((c) => (
                <li key={c.field}>
                  {fieldLabels[c.field] ?? c.field}: {show(c.from)} → {show(c.to)}
                </li>
              ))}
            </ul>
          ) : null}
          {e.reason ? <p className="text-sm text-ink-700">Reason: {e.reason}</p> : null}
        </li>
      ))}
    </ol>
  );
}
