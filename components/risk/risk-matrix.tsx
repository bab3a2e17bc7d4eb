import {
  matrixProbabilityBands,
  matrixSeverityBands,
  matrixZone,
  matrixZoneLabels,
  type MatrixPosition,
  type MatrixZone,
} from '@/lib/risk/matrix';

/*
 * The severity × probability matrix as a table: rows are severity (highest on top), columns are
 * probability. Each cell says its zone in words; the scored cell is outlined and says so, so the
 * position reads without colour (WCAG 2.2 1.4.1).
 */

const zoneClasses: Record<MatrixZone, string> = {
  low: 'bg-ok-100 text-ok-700',
  medium: 'bg-warn-100 text-warn-700',
  high: 'bg-danger-100 text-danger-700',
};

export function RiskMatrix({ position }: { position: MatrixPosition | null }) {
  const rows = [...matrixSeverityBands].reverse();
  return (
    <table className="w-full table-fixed border-collapse text-xs">
      <caption className="mb-2 text-left text-sm text-ink-700">
        Severity × probability, in the spirit of ICH Q9(R1); the zones are common practice.
        {position
          ? ` This score sits at severity “${position.severity.label}” × probability “${position.probability.label}”: ${matrixZoneLabels[position.zone].toLowerCase()} risk.`
          : ' Choose severity and occurrence to place the score.'}
      </caption>
      <thead>
        <tr>
          <th scope="col" className="w-20 p-1 text-left align-bottom font-semibold text-ink-700">
            Severity ↓ / Probability →
          </th>
          {matrixProbabilityBands.map((p) => (
            <th key={p.level} scope="col" className="p-1 text-center font-semibold text-ink-800">
              {p.label}
              <span className="block font-normal text-ink-600">
                O {p.from}-{p.to}
              </span>
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {rows.map((s) => (
          <tr key={s.level}>
            <th scope="row" className="p-1 text-left font-semibold text-ink-800">
              {s.label}
              <span className="block font-normal text-ink-600">
                S {s.from}-{s.to}
              </span>
            </th>
            {matrixProbabilityBands.map((p) => {
              const zone = matrixZone(s.level, p.level);
              const here = position?.severity.level === s.level && position.probability.level === p.level;
              return (
                <td
                  key={p.level}
                  className={`h-11 border border-white p-1 text-center font-semibold ${zoneClasses[zone]} ${
                    here ? 'outline-4 -outline-offset-4 outline-ink-900' : ''
                  }`}
                  aria-current={here ? 'true' : undefined}
                >
                  {matrixZoneLabels[zone]}
                  {here ? <span className="block text-ink-900">◆ this score</span> : null}
                </td>
              );
            })}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
