import { riskDimensionLabels, riskDimensionLetters, riskDimensionQuestions, riskDimensions, type RiskScales } from '@/lib/risk/scales';

/* A published set of scales, one table per dimension, as an auditor reads it. */

export function RiskScalesTables({ scales }: { scales: RiskScales }) {
  return (
    <div className="flex flex-col gap-6">
      {riskDimensions.map((d) => (
        <table key={d} className="w-full border-collapse rounded-lg bg-white text-left">
          <caption className="mb-2 text-left">
            <span className="text-lg font-semibold text-ink-900">
              {riskDimensionLabels[d]} ({riskDimensionLetters[d]})
            </span>
            <span className="block text-sm text-ink-600">{riskDimensionQuestions[d]}</span>
          </caption>
          <thead>
            <tr className="border-b border-ink-300 text-sm text-ink-700">
              <th scope="col" className="w-14 px-3 py-2 text-right">
                Score
              </th>
              <th scope="col" className="w-56 px-3 py-2">
                Label
              </th>
              <th scope="col" className="px-3 py-2">
                Description
              </th>
            </tr>
          </thead>
          <tbody>
            {scales[d].map((l) => (
              <tr key={l.score} className="border-b border-ink-200 align-top">
                <td className="px-3 py-2 text-right font-bold tabular-nums">{l.score}</td>
                <th scope="row" className="px-3 py-2 font-semibold">
                  {l.label}
                </th>
                <td className="px-3 py-2 text-ink-800">{l.description}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ))}
    </div>
  );
}
