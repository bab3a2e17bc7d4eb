import type { TrendMonthDto } from '@/lib/complaints/trending';

/*
 * Complaints per million units shipped, month by month: a bar per month, the month's upper limit as
 * a dashed tick across its bar, and a month above its limit drawn as a hatched red bar with
 * "signal" written over it (shape and words, not colour alone). Months without units on record get
 * "no units" instead of a bar. The same figures follow as a table for screen readers and print.
 */

const width = 720;
const height = 280;
const left = 56;
const right = 16;
const top = 28;
const bottom = 52;

const count = new Intl.NumberFormat('en-US');
const rate = (v: number | null) => (v === null ? '—' : v.toFixed(2));

function niceMax(value: number): number {
  if (value <= 0) return 1;
  const magnitude = 10 ** Math.floor(Math.log10(value));
  const step = [1, 2, 2.5, 5, 10].find((s) => s * magnitude >= value) ?? 10;
  return step * magnitude;
}

export function TrendChart({ months }: { months: TrendMonthDto[] }) {
  const peak = Math.max(0, ...months.flatMap((m) => [m.ratePerMillion ?? 0, m.upperLimit ?? 0]));
  const yMax = niceMax(peak * 1.1);
  const band = (width - left - right) / Math.max(1, months.length);
  const barWidth = Math.max(3, Math.min(36, band * 0.6));
  const x = (i: number) => left + band * i + band / 2;
  const y = (v: number) => top + (1 - v / yMax) * (height - top - bottom);
  const labelEvery = Math.ceil(months.length / 12);
  const ticks = [0, 0.25, 0.5, 0.75, 1].map((f) => f * yMax);
  const signals = months.filter((m) => m.signal);
  const noUnits = months.filter((m) => m.ratePerMillion === null);

  return (
    <figure className="flex flex-col gap-3">
      <svg viewBox={`0 0 ${width} ${height}`} className="h-auto w-full rounded-md border border-ink-200 bg-white" aria-hidden="true">
        <defs>
          <pattern id="trend-signal-hatch" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <rect width="6" height="6" fill="#a4281d" />
            <line x1="0" y1="0" x2="0" y2="6" stroke="#fbe8e5" strokeWidth="2" />
          </pattern>
        </defs>
        <text x={left} y={16} fontSize="12" fontWeight="bold" fill="#14212d">
          Complaints per million units shipped
        </text>
        {ticks.map((t) => (
          <g key={t}>
            <line x1={left} x2={width - right} y1={y(t)} y2={y(t)} stroke={t === 0 ? '#6f7f8e' : '#e8edf1'} />
            <text x={left - 6} y={y(t) + 4} fontSize="11" fill="#3b4d5f" textAnchor="end">
              {Number.isInteger(t) ? t : Number(t.toFixed(2))}
            </text>
          </g>
        ))}
        {months.map((m, i) => {
          const cx = x(i);
          const showLabel = i % labelEvery === 0 || i === months.length - 1;
          const [mon, year] = m.label.split(' ');
          return (
            <g key={m.month}>
              {m.ratePerMillion === null ? (
                <text x={cx} y={y(0) - 6} fontSize="10" fill="#5b6b7a" textAnchor="middle" writingMode={band < 40 ? 'tb' : undefined}>
                  no units
                </text>
              ) : (
                <rect
                  x={cx - barWidth / 2}
                  y={y(m.ratePerMillion)}
                  width={barWidth}
                  height={Math.max(m.ratePerMillion > 0 ? 1 : 0, y(0) - y(m.ratePerMillion))}
                  fill={m.signal ? 'url(#trend-signal-hatch)' : '#1f4f8f'}
                />
              )}
              {m.upperLimit !== null ? (
                <g>
                  {/* a white casing keeps the limit visible across a hatched red bar */}
                  <line x1={cx - band / 2 + 2} x2={cx + band / 2 - 2} y1={y(m.upperLimit)} y2={y(m.upperLimit)} stroke="#ffffff" strokeWidth="4" />
                  <line x1={cx - band / 2 + 2} x2={cx + band / 2 - 2} y1={y(m.upperLimit)} y2={y(m.upperLimit)} stroke="#a4281d" strokeWidth="2" strokeDasharray="4 3" />
                </g>
              ) : null}
              {m.signal && m.ratePerMillion !== null ? (
                <text x={cx} y={y(m.ratePerMillion) - 6} fontSize="11" fontWeight="bold" fill="#a4281d" textAnchor="middle">
                  signal
                </text>
              ) : null}
              {showLabel ? (
                <>
                  <text x={cx} y={height - bottom + 16} fontSize="11" fill="#1c2b39" textAnchor="middle">
                    {mon}
                  </text>
                  {i === 0 || mon === 'Jan' ? (
                    <text x={cx} y={height - bottom + 30} fontSize="10" fill="#3b4d5f" textAnchor="middle">
                      {year}
                    </text>
                  ) : null}
                </>
              ) : null}
              {band >= 24 ? (
                <text x={cx} y={height - 6} fontSize="10" fill="#3b4d5f" textAnchor="middle">
                  {m.complaints}
                </text>
              ) : null}
            </g>
          );
        })}
        {band >= 24 ? (
          <text x={left - 6} y={height - 6} fontSize="10" fill="#3b4d5f" textAnchor="end">
            count
          </text>
        ) : null}
      </svg>
      <figcaption className="text-sm text-ink-700">
        Bars: complaints received in the month per million units shipped from the lots made that month. Red dashes: the month’s upper limit, ū + 3√(ū/n)
        over the previous six months with units on record (u-chart, Montgomery, <cite>Introduction to Statistical Quality Control</cite>). Numbers under
        the months: complaints received.{' '}
        {signals.length === 0
          ? 'No month is above its limit.'
          : `${signals.length} month${signals.length === 1 ? '' : 's'} above the limit (hatched, marked “signal”): ${signals.map((m) => m.label).join(', ')}.`}{' '}
        {noUnits.length > 0 ? `${noUnits.length} month${noUnits.length === 1 ? ' has' : 's have'} no units shipped on record, so no rate.` : ''}
      </figcaption>
      <details className="rounded-md border border-ink-200 bg-white p-3">
        <summary className="min-h-11 cursor-pointer py-2 font-semibold">The chart as a table</summary>
        <div className="overflow-x-auto">
          <table className="mt-2 w-full min-w-[40rem] text-left text-sm">
            <caption className="sr-only">Complaints per month with units shipped, rate per million, limit and signal</caption>
            <thead>
              <tr className="border-b border-ink-200">
                <th scope="col" className="py-1 pr-3">Month</th>
                <th scope="col" className="py-1 pr-3 text-right">Complaints</th>
                <th scope="col" className="py-1 pr-3 text-right">Units shipped (lots made)</th>
                <th scope="col" className="py-1 pr-3 text-right">Per million</th>
                <th scope="col" className="py-1 pr-3 text-right">Upper limit</th>
                <th scope="col" className="py-1">Note</th>
              </tr>
            </thead>
            <tbody>
              {months.map((m) => (
                <tr key={m.month} className="border-b border-ink-100">
                  <th scope="row" className="py-1 pr-3 font-normal whitespace-nowrap">
                    {m.label}
                  </th>
                  <td className="py-1 pr-3 text-right tabular-nums">{m.complaints}</td>
                  <td className="py-1 pr-3 text-right tabular-nums">{count.format(m.units)}</td>
                  <td className="py-1 pr-3 text-right tabular-nums">{rate(m.ratePerMillion)}</td>
                  <td className="py-1 pr-3 text-right tabular-nums">{rate(m.upperLimit)}</td>
                  <td className="py-1">
                    {m.signal ? <strong className="text-danger-700">Signal. </strong> : null}
                    {m.note ?? '—'}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </details>
    </figure>
  );
}
