import { type XBarRChart as Chart, runRules } from '@/lib/weight/control-chart';
import { num } from './format';

/*
 * X̄ and R charts across a batch's checks, with the Western Electric rule numbers written beside
 * each flagged point (shape and text, not colour alone), and a table with the same numbers.
 */

const width = 720;
const left = 64;
const right = 96;

function Panel({
  title,
  values,
  centre,
  lower,
  upper,
  zones,
  flagged,
  labels,
  unit,
}: {
  title: string;
  values: number[];
  centre: number;
  lower: number;
  upper: number;
  zones?: number[];
  flagged: string[];
  labels: string[];
  unit: string;
}) {
  const height = 200;
  const top = 40;
  const bottom = 26;
  const all = [...values, lower, upper, centre];
  const pad = (Math.max(...all) - Math.min(...all)) * 0.1 || 1;
  const lo = Math.min(...all) - pad;
  const hi = Math.max(...all) + pad;
  const x = (i: number) => left + (values.length === 1 ? 0.5 : i / (values.length - 1)) * (width - left - right);
  const y = (v: number) => top + ((hi - v) / (hi - lo)) * (height - top - bottom);
  const path = values.map((v, i) => `${i === 0 ? 'M' : 'L'} ${x(i)} ${y(v)}`).join(' ');
  const limitLines: [number, string, string][] = [
    [upper, 'UCL', '6 4'],
    [centre, 'CL', ''],
    [lower, 'LCL', '6 4'],
  ];
  return (
    <svg viewBox={`0 0 ${width} ${height}`} className="h-auto w-full rounded-md border border-ink-200 bg-white" aria-hidden="true">
      <text x={left} y={14} fontSize="12" fontWeight="bold" fill="#14212d">
        {title}
      </text>
      {(zones ?? []).map((z) => (
        <line key={z} x1={left} x2={width - right} y1={y(z)} y2={y(z)} stroke="#d6dde4" strokeDasharray="2 4" />
      ))}
      {limitLines.map(([v, label, dash]) => (
        <g key={label}>
          <line x1={left} x2={width - right} y1={y(v)} y2={y(v)} stroke={label === 'CL' ? '#14212d' : '#a4281d'} strokeDasharray={dash || undefined} />
          <text x={width - right + 6} y={y(v) + 4} fontSize="11" fill="#1c2b39">
            {label} {v.toFixed(1)}
          </text>
        </g>
      ))}
      <text x={width - 6} y={14} textAnchor="end" fontSize="11" fill="#3b4d5f">
        {unit}
      </text>
      <path d={path} fill="none" stroke="#1f4f8f" strokeWidth="1.5" />
      {values.map((v, i) =>
        flagged[i] ? (
          <g key={i}>
            <rect x={x(i) - 5} y={y(v) - 5} width={10} height={10} fill="#a4281d" />
            <text x={x(i)} y={y(v) - 9} fontSize="11" fontWeight="bold" fill="#a4281d" textAnchor="middle">
              {flagged[i]}
            </text>
          </g>
        ) : (
          <circle key={i} cx={x(i)} cy={y(v)} r={4} fill="#1f4f8f" />
        ),
      )}
      {labels.length > 0 ? (
        <>
          <text x={left} y={height - 8} fontSize="11" fill="#3b4d5f">
            {labels[0]}
          </text>
          <text x={width - right} y={height - 8} fontSize="11" fill="#3b4d5f" textAnchor="end">
            {labels[labels.length - 1]}
          </text>
        </>
      ) : null}
    </svg>
  );
}

export function XBarRChart({ chart, labels, cpk }: { chart: Chart; labels: string[]; cpk: number }) {
  const sigmaMean = (chart.constants.a2 * chart.meanRange) / 3;
  const zones = [1, 2].flatMap((k) => [chart.grandMean - k * sigmaMean, chart.grandMean + k * sigmaMean]);
  const meanFlags = chart.points.map((p) => (p.flags.length > 0 ? `WE ${p.flags.join(',')}` : ''));
  const rangeFlags = chart.points.map((p) => (p.rangeOut ? 'out' : ''));
  const signals = chart.points.filter((p) => p.flags.length > 0 || p.rangeOut).length;
  return (
    <figure className="flex flex-col gap-3">
      <Panel title="X̄ (subgroup mean, mg)" values={chart.points.map((p) => p.mean)} {...chart.xbar} zones={zones} flagged={meanFlags} labels={labels} unit="mg" />
      <Panel title="R (subgroup range, mg)" values={chart.points.map((p) => p.range)} {...chart.r} flagged={rangeFlags} labels={labels} unit="mg" />
      <figcaption className="text-sm text-ink-700">
        {chart.points.length} checks, subgroups of the first {chart.n} capsules of each. X̄ limits {num(chart.xbar.lower)}–{num(chart.xbar.upper)} mg around{' '}
        {num(chart.grandMean)} mg (A2 = {chart.constants.a2}); R limits {num(chart.r.lower)}–{num(chart.r.upper)} mg (D3 = {chart.constants.lowerR}, D4 ={' '}
        {chart.constants.upperR}). σ within = R̄/d2 = {num(chart.sigma, 2)} mg; Cpk against the product limits {num(cpk, 2)}.{' '}
        {signals === 0 ? 'No run-rule signals.' : `${signals} point${signals === 1 ? '' : 's'} with a signal (red squares; the numbers are the Western Electric rules).`}{' '}
        Constants: NIST/SEMATECH e-Handbook §6.3.2; run rules: Western Electric Statistical Quality Control Handbook (1956). With fewer than about 20 checks the
        limits are provisional.
      </figcaption>
      <details className="rounded-md border border-ink-200 bg-white p-3">
        <summary className="min-h-11 cursor-pointer py-2 font-semibold">The chart as a table</summary>
        <table className="mt-2 w-full text-left text-sm">
          <thead>
            <tr className="border-b border-ink-200">
              <th scope="col" className="py-1 pr-3">Check</th>
              <th scope="col" className="py-1 pr-3">X̄ (mg)</th>
              <th scope="col" className="py-1 pr-3">R (mg)</th>
              <th scope="col" className="py-1">Signals</th>
            </tr>
          </thead>
          <tbody>
            {chart.points.map((p, i) => (
              <tr key={`${p.label}-${i}`} className="border-b border-ink-100">
                <td className="py-1 pr-3">{labels[i]}</td>
                <td className="py-1 pr-3 tabular-nums">{num(p.mean, 2)}</td>
                <td className="py-1 pr-3 tabular-nums">{num(p.range, 2)}</td>
                <td className="py-1">
                  {[...p.flags.map((f) => `Rule ${f}: ${runRules[f]}`), ...(p.rangeOut ? ['Range outside its limits'] : [])].join('; ') || '—'}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </details>
    </figure>
  );
}
