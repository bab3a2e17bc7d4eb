import type { WeightEvaluation } from '@/lib/weight/evaluate';
import { num } from './format';

/** The numbers QA reads off a check. */
export function SummaryNumbers({ evaluation }: { evaluation: WeightEvaluation }) {
  const s = evaluation.summary;
  const items: [string, string][] = [
    ['Units', String(s.count)],
    ['Mean', `${num(s.mean)} mg`],
    ['SD', `${num(s.sd, 2)} mg`],
    ['RSD', `${num(s.rsd, 2)} %`],
    ['Min', `${num(s.min)} mg`],
    ['Max', `${num(s.max)} mg`],
    ['Outside product limits', `${evaluation.outside.below} low, ${evaluation.outside.above} high`],
    ['Cpk (this sample’s SD)', num(evaluation.cpk, 2)],
  ];
  return (
    <dl className="grid grid-cols-2 gap-x-4 gap-y-2 rounded-md border border-ink-200 bg-white p-3 sm:grid-cols-4">
      {items.map(([k, v]) => (
        <div key={k} className="flex flex-col">
          <dt className="text-sm text-ink-600">{k}</dt>
          <dd className="font-semibold tabular-nums text-ink-900">{v}</dd>
        </div>
      ))}
    </dl>
  );
}
