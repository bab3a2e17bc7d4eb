import { assertRiskScore } from './scales';

/*
 * Action priority (AP) from the AIAG & VDA FMEA Handbook, 1st edition (2019): the table shared by
 * Design FMEA and Process FMEA. Severity weighs most, then occurrence, then detection, but the
 * handbook does not let severity alone decide: with S 9-10 and O 1 the priority is low whatever the
 * detection, because prevention has made the failure practically impossible.
 *
 * Source: AIAG & VDA FMEA Handbook (2019), Table 'Action Priority for DFMEA and PFMEA'. All 100
 * cells below were checked against two independent published reproductions of that table, which
 * agree with each other; no copy of the book itself was at hand, so a site that owns the handbook
 * should still compare this table with its copy once.
 */

export const actionPriorities = ['high', 'medium', 'low'] as const;
export type ActionPriority = (typeof actionPriorities)[number];

export const actionPriorityLabels: Record<ActionPriority, string> = {
  high: 'High',
  medium: 'Medium',
  low: 'Low',
};

/** What each priority asks of the team, in the handbook's sense (paraphrased). */
export const actionPriorityMeanings: Record<ActionPriority, string> = {
  high: 'Act to improve prevention or detection, or justify in writing why the current controls are adequate.',
  medium: 'Act to improve prevention or detection where possible, or record why the current controls are adequate.',
  low: 'Action is optional; the current controls may be kept.',
};

export interface ScoreBand {
  from: number;
  to: number;
}

/** Bands as the handbook groups them, highest first. */
export const severityBands = [
  { from: 9, to: 10 },
  { from: 7, to: 8 },
  { from: 4, to: 6 },
  { from: 2, to: 3 },
  { from: 1, to: 1 },
] as const satisfies readonly ScoreBand[];

export const occurrenceBands = [
  { from: 8, to: 10 },
  { from: 6, to: 7 },
  { from: 4, to: 5 },
  { from: 2, to: 3 },
  { from: 1, to: 1 },
] as const satisfies readonly ScoreBand[];

export const detectionBands = [
  { from: 7, to: 10 },
  { from: 5, to: 6 },
  { from: 2, to: 4 },
  { from: 1, to: 1 },
] as const satisfies readonly ScoreBand[];

type Cell = 'H' | 'M' | 'L';
/** Four cells, one per detection band in `detectionBands` order (D 7-10, 5-6, 2-4, 1). */
type DetectionRow = readonly [Cell, Cell, Cell, Cell];
/** Five rows, one per occurrence band in `occurrenceBands` order (O 8-10, 6-7, 4-5, 2-3, 1). */
type OccurrenceBlock = readonly [DetectionRow, DetectionRow, DetectionRow, DetectionRow, DetectionRow];

/** One block per severity band in `severityBands` order (S 9-10, 7-8, 4-6, 2-3, 1); sources above. */
export const actionPriorityTable: readonly [OccurrenceBlock, OccurrenceBlock, OccurrenceBlock, OccurrenceBlock, OccurrenceBlock] = [
  // S 9-10
  [
    ['H', 'H', 'H', 'H'],
    ['H', 'H', 'H', 'H'],
    ['H', 'H', 'H', 'M'],
    ['H', 'M', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
  ],
  // S 7-8
  [
    ['H', 'H', 'H', 'H'],
    ['H', 'H', 'H', 'M'],
    ['H', 'M', 'M', 'M'],
    ['M', 'M', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
  ],
  // S 4-6
  [
    ['H', 'H', 'M', 'M'],
    ['M', 'M', 'M', 'L'],
    ['M', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
  ],
  // S 2-3
  [
    ['M', 'M', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
  ],
  // S 1
  [
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
    ['L', 'L', 'L', 'L'],
  ],
];

const cellPriority: Record<Cell, ActionPriority> = { H: 'high', M: 'medium', L: 'low' };

/** Index of the band holding `score`; the bands cover 1-10 without gaps, checked by a unit test. */
export function bandIndex(bands: readonly ScoreBand[], score: number): number {
  return bands.findIndex((b) => score >= b.from && score <= b.to);
}

export const formatBand = (band: ScoreBand): string => (band.from === band.to ? `${band.from}` : `${band.from}-${band.to}`);

export interface ActionPriorityCell {
  priority: ActionPriority;
  severityBand: ScoreBand;
  occurrenceBand: ScoreBand;
  detectionBand: ScoreBand;
}

/** The table cell a score falls in, with its bands, so a screen can say why. */
export function actionPriorityCell(severity: number, occurrence: number, detection: number): ActionPriorityCell {
  assertRiskScore(severity, 'severity');
  assertRiskScore(occurrence, 'occurrence');
  assertRiskScore(detection, 'detection');
  const s = bandIndex(severityBands, severity);
  const o = bandIndex(occurrenceBands, occurrence);
  const d = bandIndex(detectionBands, detection);
  return {
    priority: cellPriority[actionPriorityTable[s]![o]![d]!],
    severityBand: severityBands[s]!,
    occurrenceBand: occurrenceBands[o]!,
    detectionBand: detectionBands[d]!,
  };
}

export function actionPriority(severity: number, occurrence: number, detection: number): ActionPriority {
  return actionPriorityCell(severity, occurrence, detection).priority;
}
