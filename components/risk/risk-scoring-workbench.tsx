'use client';

import { useState } from 'react';
import { classificationLabels } from '@/lib/risk/classify';
import type { RiskScales } from '@/lib/risk/scales';
import type { ScoringDefectDto } from '@/lib/risk-scales/queries';
import { ClassificationBadge } from './classification-badge';
import { RiskScoreWidget } from './risk-score-widget';

/* Pick a defect from the catalogue, then score it. A practice and look-up screen: nothing is saved. */

export function RiskScoringWorkbench({
  defects,
  scales,
  scaleVersion,
}: {
  defects: readonly ScoringDefectDto[];
  scales: RiskScales;
  scaleVersion: number;
}) {
  const [defectId, setDefectId] = useState<number | null>(null);
  const defect = defects.find((d) => d.id === defectId) ?? null;
  return (
    <div className="flex flex-col gap-6">
      <div className="flex max-w-2xl flex-col gap-1">
        <label htmlFor="risk-defect" className="font-semibold text-ink-900">
          Capsule defect
        </label>
        <p id="risk-defect-hint" className="text-sm text-ink-600">
          The catalogue gives the default class and severity; the score can raise the class, never quietly lower it.
        </p>
        <select
          id="risk-defect"
          value={defectId ?? ''}
          onChange={(e) => setDefectId(e.target.value ? Number(e.target.value) : null)}
          aria-describedby="risk-defect-hint"
          className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base"
        >
          <option value="">Choose a defect</option>
          {defects.map((d) => (
            <option key={d.id} value={d.id}>
              {d.name} ({classificationLabels[d.defaultClassification].toLowerCase()}, severity {d.defaultSeverity})
            </option>
          ))}
        </select>
      </div>
      {defect ? (
        <>
          <div className="max-w-3xl rounded-md border border-ink-200 bg-white p-4">
            <p className="flex flex-wrap items-center gap-2">
              <span className="font-semibold">{defect.name}</span>
              <ClassificationBadge classification={defect.defaultClassification} />
              <span className="text-sm text-ink-600">catalogue severity {defect.defaultSeverity}</span>
            </p>
            <p className="mt-1 text-ink-800">{defect.description}</p>
          </div>
          <RiskScoreWidget
            key={defect.id}
            scales={scales}
            scaleVersion={scaleVersion}
            defaultClassification={defect.defaultClassification}
            catalogueSeverity={defect.defaultSeverity}
            caution={defect.caution}
          />
        </>
      ) : null}
    </div>
  );
}
