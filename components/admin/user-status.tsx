import { StatusBadge } from '@/components/ui/status-badge';
import { formatUtc } from '@/components/ui/format';

export function ActiveBadge({ active }: { active: boolean }) {
  return active ? <StatusBadge tone="ok" label="Active" /> : <StatusBadge tone="neutral" label="Deactivated" />;
}

/** "Locked until …" while a lock-out runs; nothing once it has expired. */
export function LockBadge({ lockedUntil, now }: { lockedUntil: string | null; now: Date }) {
  if (!lockedUntil || new Date(lockedUntil).getTime() <= now.getTime()) return <span className="text-ink-600">—</span>;
  return <StatusBadge tone="warn" label={`Locked until ${formatUtc(lockedUntil)}`} />;
}
