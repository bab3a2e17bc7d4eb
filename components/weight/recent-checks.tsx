import { formatUtc } from '@/components/ui/format';
import { StatusBadge } from '@/components/ui/status-badge';
import type { WeightCheckDto } from '@/lib/weight-checks/types';
import { methodShortLabels } from '@/lib/weight/evaluate';
import { num } from './format';

/** A batch's checks, newest first. */
export function RecentChecks({ checks }: { checks: readonly WeightCheckDto[] }) {
  if (checks.length === 0) return <p className="text-ink-700">No weight checks recorded for this batch yet.</p>;
  return (
    <div className="overflow-x-auto rounded-md border border-ink-200 bg-white">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Weight checks of this batch, newest first</caption>
        <thead className="bg-ink-100">
          <tr>
            {['Checked', 'Method', 'Units', 'Mean', 'SD', 'Min–max', 'Outside', 'Verdict', 'By'].map((h) => (
              <th key={h} scope="col" className="px-3 py-2 font-semibold">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {[...checks].reverse().map((c) => (
            <tr key={c.id} className="border-t border-ink-100 align-top">
              <td className="px-3 py-2 whitespace-nowrap">{formatUtc(c.checkedAt)}</td>
              <td className="px-3 py-2 whitespace-nowrap">{methodShortLabels[c.method]}</td>
              <td className="px-3 py-2 tabular-nums">
                {c.sampleSize} {c.massMode}
              </td>
              <td className="px-3 py-2 tabular-nums">{num(c.meanMg)} mg</td>
              <td className="px-3 py-2 tabular-nums">{num(c.sdMg, 2)}</td>
              <td className="px-3 py-2 tabular-nums whitespace-nowrap">
                {num(c.minMg)}–{num(c.maxMg)}
              </td>
              <td className="px-3 py-2 tabular-nums">{c.outOfLimitCount}</td>
              <td className="px-3 py-2">
                <StatusBadge tone={c.verdict === 'pass' ? 'ok' : 'danger'} label={c.verdict === 'pass' ? 'Pass' : 'Fail'} />
              </td>
              <td className="px-3 py-2">{c.recordedBy.name}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
