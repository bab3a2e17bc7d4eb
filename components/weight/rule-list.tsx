import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import type { RuleResult, RuleStatus } from '@/lib/weight/evaluate';

const statusView: Record<RuleStatus, { tone: Tone; label: string }> = {
  pass: { tone: 'ok', label: 'Met' },
  fail: { tone: 'danger', label: 'Not met' },
  incomplete: { tone: 'neutral', label: 'Needs more units' },
  next_stage: { tone: 'warn', label: 'Go to next stage' },
};

/** The evaluation rule by rule: what was required, the source, the result and the numbers behind it. */
export function RuleList({ rules }: { rules: readonly RuleResult[] }) {
  if (rules.length === 0) return null;
  return (
    <ol className="flex flex-col gap-2" aria-label="Rules">
      {rules.map((r) => (
        <li key={r.id} className="flex flex-col gap-1 rounded-md border border-ink-200 bg-white px-3 py-2 sm:flex-row sm:items-start sm:gap-3">
          <span className="shrink-0 sm:w-44">
            <StatusBadge {...statusView[r.status]} />
          </span>
          <span className="flex flex-col">
            <span className="font-semibold text-ink-900">{r.label}</span>
            <span className="text-ink-800">{r.detail}</span>
            <span className="text-sm text-ink-600">{r.source}</span>
          </span>
        </li>
      ))}
    </ol>
  );
}
