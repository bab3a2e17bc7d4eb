/*
 * The three 1-10 scales an investigator scores a capsule defect on. A scale is data: the wording of
 * each step can be changed by publishing a new version (lib/risk-scales), and a scored record keeps
 * the version it was scored with. The defaults below are Plumbline's own wording for hard-capsule
 * filling; the 1-10 shape follows IEC 60812:2018 and the AIAG & VDA FMEA Handbook (2019), the
 * frequency and control anchors are common practice and a site should review them.
 */

export const riskDimensions = ['severity', 'occurrence', 'detection'] as const;
export type RiskDimension = (typeof riskDimensions)[number];

export const riskDimensionLabels: Record<RiskDimension, string> = {
  severity: 'Severity',
  occurrence: 'Occurrence',
  detection: 'Detection',
};

export const riskDimensionLetters: Record<RiskDimension, 'S' | 'O' | 'D'> = {
  severity: 'S',
  occurrence: 'O',
  detection: 'D',
};

/** What a high number means on each scale, shown next to the selectors. */
export const riskDimensionQuestions: Record<RiskDimension, string> = {
  severity: 'How bad is it for the person who swallows the capsule, and for the batch?',
  occurrence: 'How often does it happen, per batch or per 10,000 capsules?',
  detection: 'How likely is it to escape the visual sort, weight checks and AQL inspection? (10 = will escape)',
};

export const riskScoreMin = 1;
export const riskScoreMax = 10;
export const riskScores = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10] as const;
export type RiskScore = (typeof riskScores)[number];

export interface RiskLevel {
  score: number;
  label: string;
  description: string;
}

export type RiskScales = Record<RiskDimension, readonly RiskLevel[]>;

export const riskLabelMaxLength = 80;
export const riskDescriptionMaxLength = 600;

export function isRiskScore(value: unknown): value is RiskScore {
  return typeof value === 'number' && Number.isInteger(value) && value >= riskScoreMin && value <= riskScoreMax;
}

/** Throws a RangeError naming the scale: a score outside 1-10 is a programming error, not a user's typo. */
export function assertRiskScore(value: unknown, dimension: RiskDimension): asserts value is RiskScore {
  if (!isRiskScore(value)) {
    throw new RangeError(`${riskDimensionLabels[dimension]} must be a whole number from 1 to 10 (got ${String(value)}).`);
  }
}

const levels = (rows: readonly (readonly [string, string])[]): RiskLevel[] =>
  rows.map(([label, description], i) => ({ score: i + 1, label, description }));

export const defaultRiskScales: RiskScales = {
  severity: levels([
    ['No effect', 'Nobody outside the plant could notice it. No effect on the dose, on safety or on the batch.'],
    [
      'Cosmetic, trained eye only',
      'A flaw only a trained inspector sees. Dose and safety unaffected; the batch is released as normal.',
    ],
    [
      'Cosmetic, noticeable',
      'A dent, faint print or dust on the shell a consumer may notice. Dose and safety unaffected; a complaint is possible.',
    ],
    [
      'Appearance or handling',
      'The capsule looks wrong or is awkward to take and is likely to cause a complaint. Dose intact; the batch may need an extra sort.',
    ],
    [
      'Some units hard to use',
      'A capsule may come apart or stick, or lose a little fill. The dose change is unlikely to matter; the batch is re-inspected before release.',
    ],
    [
      'Reduced dose in some units',
      'Fill lost or outside limits in some units (e.g. a leaking crack): the person may get less effect. The batch is held for a re-sort or rework.',
    ],
    [
      'Dose clearly wrong',
      'Light or heavy fill or an unusable capsule: the person may get too little or too much. Affected portions of the batch are likely rejected.',
    ],
    [
      'Dose missing',
      'No dose at all or a gross underfill (e.g. an empty capsule) where a missed dose matters. The batch is not released without a full investigation.',
    ],
    [
      'Possible injury',
      'Foreign matter or contamination that could injure or cause a reaction (metal, glass, another active). The batch is rejected, or recalled if already released.',
    ],
    [
      'Wrong medicine taken',
      'Wrong product or strength, or a mix-up: the person takes something they were never meant to. Serious harm is possible; recall and reporting if released.',
    ],
  ]),
  occurrence: levels([
    [
      'Prevented by design',
      'Cannot happen on this line as set up (dedicated parts, interlock, single product in the room). Never seen.',
    ],
    ['Remote', 'About 1 in a million capsules or fewer (0.01 per 10,000). Seen at most once a year on the site.'],
    ['Very rare', 'Up to 1 in 100,000 capsules (0.1 per 10,000). Isolated units in fewer than 1 batch in 20.'],
    ['Rare', 'Up to 1 in 20,000 capsules (0.5 per 10,000). A few units in some batches.'],
    ['Occasional', 'Up to 1 per 10,000 capsules. Found in about 1 batch in 5.'],
    ['Regular', 'Up to 5 per 10,000 capsules (0.05 %). Found in most batches.'],
    ['Frequent', 'Up to 20 per 10,000 capsules (0.2 %). In every batch, several per hour of running.'],
    ['Very frequent', 'Up to 50 per 10,000 capsules (0.5 %). Seen at nearly every sampling interval.'],
    ['Process not capable', 'Up to 200 per 10,000 capsules (2 %). The machine cannot hold the requirement as set.'],
    ['Out of control', 'More than 200 per 10,000 capsules (over 2 %). Found in almost every sample.'],
  ]),
  detection: levels([
    [
      'Cannot escape',
      'Every unit is checked by a verified automatic reject, and the 100 % visual sort and AQL inspection back it up.',
    ],
    [
      'Almost certain',
      'Obvious on every unit at the 100 % visual sort, and an in-process check or the AQL inspection also catches it.',
    ],
    ['Very likely', 'Clearly visible on every affected unit (e.g. an open capsule); the 100 % sort removes it reliably.'],
    [
      'Likely',
      'Visible, and the 100 % sort removes it most of the time; the AQL sample gives a good chance of catching escapes.',
    ],
    [
      'Moderate',
      'Not visible, but in-process weight checks at each interval catch it when it is more than occasional (e.g. a moderate light fill).',
    ],
    [
      'Low',
      'Only the sampled checks (20-capsule weight check, AQL sample) can catch it, and only when it is frequent.',
    ],
    [
      'Very low',
      'Hard to see even at the 100 % sort (a small particle, a slight colour difference); sampled checks rarely find it.',
    ],
    [
      'Remote',
      'Not visible and not shown by weight (e.g. a powder of the same colour); only a laboratory test not routinely done would find it.',
    ],
    ['Very remote', 'No control in place looks for it; it is found only by chance before release.'],
    [
      'Will escape',
      'No control on site can detect it before release (e.g. a mix-up of identical shells and powder).',
    ],
  ]),
};

/** The wording of one step; falls back to the bare number when a scale lacks the step. */
export function levelFor(scales: RiskScales, dimension: RiskDimension, score: number): RiskLevel {
  return scales[dimension].find((l) => l.score === score) ?? { score, label: String(score), description: '' };
}
