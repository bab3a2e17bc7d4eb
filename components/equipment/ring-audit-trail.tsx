import { formatUtc } from '@/components/ui/format';
import { type RingCondition, ringConditionLabels, ringEventLabels, ringStateLabels } from '@/lib/equipment/labels';
import type { AuditEntryDto } from '@/lib/records/trail';

/* The ring's audit entries (21 CFR 11.10(e)): who, when in UTC, what changed from what to what, and why. */

const fieldLabels: Record<string, string> = {
  status: 'Status',
  condition: 'Condition',
  statusReason: 'Reason out of service',
  retiredAt: 'Retired at',
  signature: 'Signature',
  serial: 'Serial',
  machineId: 'Machine',
  capsuleSize: 'Capsule size',
};

const actionLabels: Record<string, string> = { ...ringEventLabels, create: 'Registered', signed: 'Signed' };

function show(field: string, value: unknown): string {
  if (value === null || value === undefined || value === '') return '(empty)';
  if (field === 'status' && typeof value === 'string') return ringStateLabels[value as keyof typeof ringStateLabels] ?? value;
  if (field === 'condition' && typeof value === 'string') return ringConditionLabels[value as RingCondition] ?? value;
  if (typeof value === 'string' && /^\d{4}-\d{2}-\d{2}T/.test(value)) return formatUtc(value, true);
  if (field === 'signature' && typeof value === 'object') {
    const s = value as { meaning?: string; recordVersion?: number };
    return `${s.meaning ?? 'signature'} on version ${s.recordVersion ?? '?'}`;
  }
  return typeof value === 'object' ? JSON.stringify(value) : String(value);
}

export function RingAuditTrail({ entries }: { entries: readonly AuditEntryDto[] }) {
  if (entries.length === 0) return <p className="text-ink-600">No audit entries yet.</p>;
  return (
    <ol className="flex flex-col divide-y divide-ink-200 rounded-lg border border-ink-200 bg-white">
      {entries.map((e) => (
        <li key={e.id} className="flex flex-col gap-1 px-4 py-3">
          <p className="flex flex-wrap gap-x-3">
            <span className="font-semibold">{actionLabels[e.action] ?? e.action.replace(/_/g, ' ').replace(/^./, (c) => c.toUpperCase())}</span>
            <span className="text-ink-600">
              {formatUtc(e.at, true)} · {e.userName}
            </span>
          </p>
          {e.changes.length > 0 ? (
            <ul className="text-sm text-ink-800">
              {e.changes.map((c) => (
                <li key={c.field}>
                  {fieldLabels[c.field] ?? c.field}: {show(c.field, c.from)} → {show(c.field, c.to)}
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
