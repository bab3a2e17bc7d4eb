'use client';

import type { RiskLevel } from '@/lib/risk/scales';

/*
 * One 1-10 scale as a radio group: every step shows its number, label and description, so the
 * investigator reads the wording they are scoring against. Native radios give arrow-key movement
 * and a single tab stop; each row is a large label, easy to hit on a tablet.
 */

export function ScaleSelector({
  name,
  legend,
  question,
  levels,
  value,
  onChange,
  catalogueScore,
}: {
  name: string;
  legend: string;
  question: string;
  levels: readonly RiskLevel[];
  value: number | null;
  onChange: (score: number) => void;
  /** The defect's default on this scale, marked in the list. */
  catalogueScore?: number | null;
}) {
  const selected = levels.find((l) => l.score === value);
  return (
    <fieldset className="rounded-lg border border-ink-300 bg-white p-4">
      <legend className="px-1 text-lg font-semibold text-ink-900">
        {legend}
        <span className="ml-2 font-normal text-ink-700">{selected ? `${selected.score} – ${selected.label}` : 'not scored'}</span>
      </legend>
      <p className="mb-3 text-sm text-ink-600">{question}</p>
      <div className="flex flex-col gap-1">
        {levels.map((level) => {
          const id = `${name}-${level.score}`;
          const checked = value === level.score;
          return (
            <label
              key={level.score}
              htmlFor={id}
              className={`flex min-h-11 cursor-pointer items-start gap-3 rounded-md border px-3 py-2 ${
                checked ? 'border-ink-900 bg-brass-50 ring-2 ring-brass-600' : 'border-ink-200 hover:bg-ink-50'
              }`}
            >
              <input
                id={id}
                type="radio"
                name={name}
                value={level.score}
                checked={checked}
                onChange={() => onChange(level.score)}
                className="mt-1 h-5 w-5 shrink-0 accent-ink-900"
              />
              <span className="w-6 shrink-0 text-right font-bold tabular-nums text-ink-900">{level.score}</span>
              <span className="flex flex-col">
                <span className="font-semibold text-ink-900">
                  {level.label}
                  {catalogueScore === level.score ? (
                    <span className="ml-2 rounded bg-ink-100 px-1.5 py-0.5 text-xs font-semibold text-ink-700">catalogue default</span>
                  ) : null}
                </span>
                <span className="text-sm text-ink-700">{level.description}</span>
              </span>
            </label>
          );
        })}
      </div>
    </fieldset>
  );
}
