import type { WeightEvaluation } from '@/lib/weight/evaluate';
import { num } from './format';

/*
 * Individual content masses against the average, the pharmacopoeial limits around the average and
 * the product's own limits. Hand-written SVG; units outside a limit get a different marker (not
 * colour alone), and the caption says in words what the chart shows.
 */

interface Line {
  y: number;
  label: string;
  kind: 'average' | 'chapter' | 'product';
}

function chapterLines(e: WeightEvaluation): Line[] {
  const p = e.pharmacopoeia;
  if (!p) return [];
  if (p.method === 'ph_eur_2_9_5' && p.status !== 'incomplete') {
    return [
      { y: p.lowerMg, label: `−${p.percentLimit} %`, kind: 'chapter' },
      { y: p.upperMg, label: `+${p.percentLimit} %`, kind: 'chapter' },
      { y: p.lowerDoubleMg, label: `−${2 * p.percentLimit} %`, kind: 'chapter' },
      { y: p.upperDoubleMg, label: `+${2 * p.percentLimit} %`, kind: 'chapter' },
    ];
  }
  if (p.method === 'usp_2091' && p.stage1) {
    const a = p.stage1.averageMg;
    return [
      { y: a * 0.9, label: '−10 %', kind: 'chapter' },
      { y: a * 1.1, label: '+10 %', kind: 'chapter' },
    ];
  }
  return [];
}

export function MassChart({ evaluation, limits }: { evaluation: WeightEvaluation; limits: { targetMg: number; lowerMg: number; upperMg: number } }) {
  const masses = evaluation.netMg;
  if (masses.length === 0 || evaluation.problems.length > 0) return null;
  const average = evaluation.summary.mean;
  const lines: Line[] = [
    { y: average, label: 'average', kind: 'average' },
    ...chapterLines(evaluation),
    { y: limits.lowerMg, label: 'product low', kind: 'product' },
    { y: limits.upperMg, label: 'product high', kind: 'product' },
  ];
  const all = [...masses, ...lines.map((l) => l.y)];
  const pad = (Math.max(...all) - Math.min(...all)) * 0.08 || 1;
  const lo = Math.min(...all) - pad;
  const hi = Math.max(...all) + pad;
  const width = 720;
  const height = 300;
  const left = 64;
  const right = 110;
  const top = 12;
  const bottom = 32;
  const x = (i: number) => left + ((i + 0.5) / masses.length) * (width - left - right);
  const y = (v: number) => top + ((hi - v) / (hi - lo)) * (height - top - bottom);
  const outside = (v: number) => v < limits.lowerMg || v > limits.upperMg;
  const ticks = Array.from({ length: 5 }, (_, i) => lo + ((hi - lo) * i) / 4);
  const nOutside = evaluation.outside.below + evaluation.outside.above;
  // Lines close together (e.g. the chapter's ±7.5 % and product limits at target ± 7.5 %) would
  // print their labels over each other: spread the labels, top to bottom, at least one text line apart.
  const labelGap = 13;
  const labelY = new Map<Line, number>();
  let previous = -Infinity;
  for (const l of [...lines].sort((a, b) => y(a.y) - y(b.y))) {
    const at = Math.max(y(l.y) + 4, previous + labelGap);
    labelY.set(l, at);
    previous = at;
  }

  return (
    <figure className="flex flex-col gap-2">
      <svg viewBox={`0 0 ${width} ${height}`} className="h-auto w-full rounded-md border border-ink-200 bg-white" role="img" aria-labelledby="mass-chart-caption">
        {ticks.map((t) => (
          <g key={t}>
            <line x1={left} x2={width - right} y1={y(t)} y2={y(t)} stroke="#e8edf1" />
            <text x={left - 6} y={y(t) + 4} textAnchor="end" fontSize="11" fill="#3b4d5f">
              {t.toFixed(0)}
            </text>
          </g>
        ))}
        <text x={14} y={height / 2} fontSize="11" fill="#3b4d5f" transform={`rotate(-90 14 ${height / 2})`} textAnchor="middle">
          content mass (mg)
        </text>
        {lines.map((l) => (
          <g key={`${l.kind}-${l.label}`}>
            <line
              x1={left}
              x2={width - right}
              y1={y(l.y)}
              y2={y(l.y)}
              stroke={l.kind === 'average' ? '#14212d' : l.kind === 'product' ? '#a4281d' : '#a3690c'}
              strokeWidth={l.kind === 'average' ? 2 : 1.5}
              strokeDasharray={l.kind === 'chapter' ? '6 4' : l.kind === 'product' ? '2 3' : undefined}
            />
            <text x={width - right + 6} y={labelY.get(l) ?? y(l.y) + 4} fontSize="11" fill="#1c2b39">
              {l.label} {l.y.toFixed(1)}
            </text>
          </g>
        ))}
        {masses.map((m, i) =>
          outside(m) ? (
            <path key={i} d={`M ${x(i)} ${y(m) - 7} L ${x(i) + 7} ${y(m) + 5} L ${x(i) - 7} ${y(m) + 5} Z`} fill="#a4281d">
              <title>{`Unit ${i + 1}: ${m.toFixed(1)} mg, outside the product limits`}</title>
            </path>
          ) : (
            <circle key={i} cx={x(i)} cy={y(m)} r={4.5} fill="#1f4f8f">
              <title>{`Unit ${i + 1}: ${m.toFixed(1)} mg`}</title>
            </circle>
          ),
        )}
        <text x={(left + width - right) / 2} y={height - 8} fontSize="11" fill="#3b4d5f" textAnchor="middle">
          unit 1 … {masses.length}
        </text>
      </svg>
      <figcaption id="mass-chart-caption" className="text-sm text-ink-700">
        {masses.length} content masses from {num(evaluation.summary.min)} to {num(evaluation.summary.max)} mg around an average of {num(average)} mg;{' '}
        {nOutside === 0 ? 'none' : nOutside} outside the product limits {num(limits.lowerMg)}–{num(limits.upperMg)} mg (shown as triangles).
        Dashed brass lines: the chapter&apos;s limits around the average; dotted red lines: the product&apos;s limits.
      </figcaption>
    </figure>
  );
}
