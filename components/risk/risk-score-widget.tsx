'use client';

import { useEffect, useId, useMemo, useState } from 'react';
import { Notice } from '@/components/ui/notice';
import { actionPriorityMeanings, formatBand } from '@/lib/risk/action-priority';
import { assessRisk, type RiskAssessment } from '@/lib/risk/assess';
import { classificationLabels, classifications, quarantineCaution, type Classification } from '@/lib/risk/classify';
import { rpnMax } from '@/lib/risk/rpn';
import {
  riskDimensionLabels,
  riskDimensionLetters,
  riskDimensionQuestions,
  riskDimensions,
  type RiskDimension,
  type RiskScales,
} from '@/lib/risk/scales';
import { ActionPriorityBadge } from './action-priority-badge';
import { ClassificationBadge } from './classification-badge';
import { RiskMatrix } from './risk-matrix';
import { ScaleSelector } from './scale-selector';

/*
 * Scoring one capsule defect on the three scales. Everything is computed in the browser on each
 * change (lib/risk is pure table look-ups), and nothing is saved by the widget itself: inside a form
 * its radios, the scale version and the class to record are ordinary fields, and `onChange` hands
 * the same values to a parent that wants them.
 */

type Scores = Record<RiskDimension, number | null>;

export interface RiskScoreValue {
  severity: number | null;
  occurrence: number | null;
  detection: number | null;
  /** The version of the scales the score was made on; recorded with the score. */
  scaleVersion: number;
  /** Null until all three scores are chosen. */
  assessment: RiskAssessment | null;
  /** The class the investigator chose when it differs from the computed one. */
  chosen: Classification | null;
  justification: string;
}

export interface RiskScoreWidgetProps {
  scales: RiskScales;
  scaleVersion: number;
  defaultClassification: Classification;
  /** The defect's default severity: preselected and marked on the severity scale. */
  catalogueSeverity?: number | null;
  /** The defect's own caution, shown when the result is critical (else a general quarantine reminder). */
  caution?: string | null;
  initial?: Partial<Record<RiskDimension, number>>;
  /** Prefix for field names when the widget sits inside a form, e.g. "risk_". */
  namePrefix?: string;
  onChange?: (value: RiskScoreValue) => void;
}

export function RiskScoreWidget({
  scales,
  scaleVersion,
  defaultClassification,
  catalogueSeverity = null,
  caution = null,
  initial = {},
  namePrefix = '',
  onChange,
}: RiskScoreWidgetProps) {
  const [scores, setScores] = useState<Scores>({
    severity: initial.severity ?? catalogueSeverity ?? null,
    occurrence: initial.occurrence ?? null,
    detection: initial.detection ?? null,
  });
  const [chosen, setChosen] = useState<Classification | ''>('');
  const [justification, setJustification] = useState('');
  const id = useId();

  const assessment = useMemo(() => {
    const { severity, occurrence, detection } = scores;
    if (severity === null || occurrence === null || detection === null) return null;
    return assessRisk({ defaultClassification, severity, occurrence, detection, chosen: chosen || null });
  }, [scores, defaultClassification, chosen]);

  useEffect(() => {
    onChange?.({ ...scores, scaleVersion, assessment, chosen: chosen || null, justification });
  }, [scores, scaleVersion, assessment, chosen, justification, onChange]);

  const missing = riskDimensions.filter((d) => scores[d] === null).map((d) => riskDimensionLabels[d].toLowerCase());
  const scoreLine = riskDimensions.map((d) => `${riskDimensionLetters[d]} ${scores[d] ?? '–'}`).join(' · ');

  return (
    <div className="flex flex-col gap-4 lg:grid lg:grid-cols-[minmax(0,1fr)_minmax(0,30rem)] lg:items-start lg:gap-6">
      <input type="hidden" name={`${namePrefix}scaleVersion`} value={scaleVersion} />

      {/* On narrow screens the full results sit below the scales; this strip keeps the outcome in view. */}
      <div className="sticky top-0 z-10 flex flex-wrap items-center gap-x-4 gap-y-2 rounded-md border border-ink-300 bg-white/95 px-3 py-2 shadow-sm lg:hidden">
        <span className="font-semibold tabular-nums">{scoreLine}</span>
        {assessment ? (
          <>
            <span className="tabular-nums">RPN {assessment.rpn}</span>
            <ActionPriorityBadge priority={assessment.actionPriority.priority} />
            <ClassificationBadge classification={assessment.classification.classification} />
          </>
        ) : (
          <span className="text-ink-600">Choose {missing.join(', ')}.</span>
        )}
      </div>

      <div className="flex flex-col gap-4">
        {riskDimensions.map((d) => (
          <ScaleSelector
            key={d}
            name={`${namePrefix}${d}`}
            legend={`${riskDimensionLabels[d]} (${riskDimensionLetters[d]})`}
            question={riskDimensionQuestions[d]}
            levels={scales[d]}
            value={scores[d]}
            onChange={(score) => setScores((s) => ({ ...s, [d]: score }))}
            catalogueScore={d === 'severity' ? catalogueSeverity : null}
          />
        ))}
      </div>

      <section
        aria-labelledby={`${id}-result`}
        aria-live="polite"
        // Scrolls on its own on wide screens so the class to record stays reachable while it sticks.
        tabIndex={0}
        className="flex flex-col gap-4 rounded-lg border border-ink-300 bg-white p-4 lg:sticky lg:top-4 lg:max-h-[calc(100dvh-2rem)] lg:overflow-y-auto"
      >
        <h2 id={`${id}-result`} className="text-lg font-semibold">
          Result <span className="font-normal text-ink-600">({scoreLine})</span>
        </h2>
        {assessment ? (
          <>
            <div className="flex flex-col gap-1">
              <p>
                <span className="text-3xl font-bold tabular-nums">RPN {assessment.rpn}</span>
                <span className="text-ink-600"> of {rpnMax}</span>
              </p>
              <p className="text-sm text-ink-600">S × O × D (IEC 60812:2018). For reference: the action priority decides what comes first.</p>
            </div>
            <div className="flex flex-col gap-1">
              <ActionPriorityBadge priority={assessment.actionPriority.priority} />
              <p className="text-sm text-ink-700">{actionPriorityMeanings[assessment.actionPriority.priority]}</p>
              <p className="text-sm text-ink-600">
                AIAG & VDA FMEA Handbook (2019) table, row S {formatBand(assessment.actionPriority.severityBand)} · O{' '}
                {formatBand(assessment.actionPriority.occurrenceBand)} · D {formatBand(assessment.actionPriority.detectionBand)}.
              </p>
            </div>
            <RiskMatrix position={assessment.matrix} />
            <ClassificationPanel
              id={id}
              assessment={assessment}
              chosen={chosen}
              onChoose={setChosen}
              justification={justification}
              onJustify={setJustification}
              namePrefix={namePrefix}
              caution={caution}
            />
          </>
        ) : (
          <>
            {defaultClassification === 'critical' ? (
              // A critical defect means quarantine before anything else, whatever the score will be.
              <Notice tone="danger" title="Quarantine first" live={false}>
                {caution ?? quarantineCaution}
              </Notice>
            ) : null}
            <p className="text-ink-700">Choose a score on {missing.join(', ')} to see the RPN, action priority and classification.</p>
            <RiskMatrix position={null} />
          </>
        )}
        <p className="text-sm text-ink-600">Scored on version {scaleVersion} of the risk scales.</p>
      </section>
    </div>
  );
}

function ClassificationPanel({
  id,
  assessment,
  chosen,
  onChoose,
  justification,
  onJustify,
  namePrefix,
  caution,
}: {
  id: string;
  assessment: RiskAssessment;
  chosen: Classification | '';
  onChoose: (c: Classification | '') => void;
  justification: string;
  onJustify: (text: string) => void;
  namePrefix: string;
  caution: string | null;
}) {
  const result = assessment.classification;
  const needsJustification = result.overrideJustificationRequired;
  return (
    <div className="flex flex-col gap-3 border-t border-ink-200 pt-3">
      <p className="flex flex-wrap items-center gap-2">
        <span className="font-semibold">Classification</span>
        <ClassificationBadge classification={result.classification} />
      </p>
      <p className="text-sm text-ink-800">{result.reason}</p>
      {result.quarantine ? (
        <Notice tone="danger" title="Quarantine first">
          {caution ?? quarantineCaution}
        </Notice>
      ) : null}
      <div className="flex flex-col gap-1">
        <label htmlFor={`${id}-chosen`} className="font-semibold">
          Class to record
        </label>
        <select
          id={`${id}-chosen`}
          name={`${namePrefix}classification`}
          value={chosen}
          onChange={(e) => onChoose(e.target.value as Classification | '')}
          className="block min-h-11 w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base"
        >
          <option value="">As computed ({classificationLabels[result.computed]})</option>
          {classifications.map((c) => (
            <option key={c} value={c}>
              {classificationLabels[c]}
            </option>
          ))}
        </select>
      </div>
      {needsJustification ? (
        <div className="flex flex-col gap-1">
          <label htmlFor={`${id}-justification`} className="font-semibold">
            Justification for the lower class <span className="font-normal text-ink-600">(required)</span>
          </label>
          <p id={`${id}-justification-hint`} className="text-sm text-warn-700">
            The class is below what the defect and the score give. Say why; the computed class and this reason stay on record.
          </p>
          <textarea
            id={`${id}-justification`}
            name={`${namePrefix}classificationJustification`}
            required
            rows={3}
            value={justification}
            onChange={(e) => onJustify(e.target.value)}
            aria-describedby={`${id}-justification-hint`}
            className="block w-full rounded-md border border-ink-400 bg-white px-3 py-2 text-base"
          />
        </div>
      ) : null}
    </div>
  );
}
