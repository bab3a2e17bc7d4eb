import { assertRiskScore } from './scales';

/*
 * A 5 × 5 severity × probability matrix in the spirit of ICH Q9(R1) (Quality Risk Management,
 * Annex I: risk ranking and filtering). ICH Q9 prescribes no particular matrix; the bands and the
 * low / medium / high zones below are Plumbline's own, following common practice: a cell is high
 * when severity band × probability band is 15 or more, medium from 5 to 12, low up to 4. The zones
 * are written out as data so a reader sees the grid, not a formula.
 */

export const matrixZones = ['low', 'medium', 'high'] as const;
export type MatrixZone = (typeof matrixZones)[number];

export const matrixZoneLabels: Record<MatrixZone, string> = { low: 'Low', medium: 'Medium', high: 'High' };

export interface MatrixBand {
  /** 1 (lowest) to 5 (highest). */
  level: number;
  label: string;
  from: number;
  to: number;
}

/** Severity 1-10 grouped in pairs. */
export const matrixSeverityBands: readonly MatrixBand[] = [
  { level: 1, label: 'Negligible', from: 1, to: 2 },
  { level: 2, label: 'Low', from: 3, to: 4 },
  { level: 3, label: 'Moderate', from: 5, to: 6 },
  { level: 4, label: 'Serious', from: 7, to: 8 },
  { level: 5, label: 'Severe', from: 9, to: 10 },
];

/** Probability of occurrence, from the occurrence score 1-10 grouped in pairs. */
export const matrixProbabilityBands: readonly MatrixBand[] = [
  { level: 1, label: 'Remote', from: 1, to: 2 },
  { level: 2, label: 'Unlikely', from: 3, to: 4 },
  { level: 3, label: 'Occasional', from: 5, to: 6 },
  { level: 4, label: 'Likely', from: 7, to: 8 },
  { level: 5, label: 'Frequent', from: 9, to: 10 },
];

type Z = 'L' | 'M' | 'H';
/**
 * Rows by severity level 1..5, columns by probability level 1..5. Common practice (see above).
 */
const zoneGrid: readonly (readonly Z[])[] = [
  ['L', 'L', 'L', 'L', 'M'],
  ['L', 'L', 'M', 'M', 'M'],
  ['L', 'M', 'M', 'M', 'H'],
  ['L', 'M', 'M', 'H', 'H'],
  ['M', 'M', 'H', 'H', 'H'],
];

const zoneOf: Record<Z, MatrixZone> = { L: 'low', M: 'medium', H: 'high' };

/** The zone of a cell given its severity level and probability level (each 1..5). */
export function matrixZone(severityLevel: number, probabilityLevel: number): MatrixZone {
  const z = zoneGrid[severityLevel - 1]?.[probabilityLevel - 1];
  if (!z) throw new RangeError(`Matrix levels run from 1 to 5 (got ${severityLevel} × ${probabilityLevel}).`);
  return zoneOf[z];
}

const bandFor = (bands: readonly MatrixBand[], score: number): MatrixBand =>
  bands.find((b) => score >= b.from && score <= b.to)!;

export interface MatrixPosition {
  severity: MatrixBand;
  probability: MatrixBand;
  zone: MatrixZone;
}

export function matrixPosition(severity: number, occurrence: number): MatrixPosition {
  assertRiskScore(severity, 'severity');
  assertRiskScore(occurrence, 'occurrence');
  const s = bandFor(matrixSeverityBands, severity);
  const p = bandFor(matrixProbabilityBands, occurrence);
  return { severity: s, probability: p, zone: matrixZone(s.level, p.level) };
}
