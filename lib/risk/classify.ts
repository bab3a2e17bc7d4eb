import { actionPriority, type ActionPriority } from './action-priority';
import { assertRiskScore } from './scales';

/*
 * Classification of a deviation from its capsule defect and its risk score. The defect's catalogue
 * classification is the floor; the score can only raise it:
 *  - severity 9 or 10 (possible injury, wrong medicine) → critical, whatever the occurrence or
 *    detection: classification is about consequence, while action priority is about what to do
 *    first, so S 9-10 with O 1 is critical even though its action priority is low;
 *  - action priority high → at least major.
 * These two rules are common practice (classing defects by consequence, as the critical / major /
 * minor defect classes of ANSI/ASQ Z1.4 do), not a published table.
 * An investigator may choose another class. Choosing one below the computed class needs a written
 * justification (`overrideJustificationRequired`); the computed class and its reason stay on record.
 */

export const classifications = ['critical', 'major', 'minor'] as const;
export type Classification = (typeof classifications)[number];

export const classificationLabels: Record<Classification, string> = {
  critical: 'Critical',
  major: 'Major',
  minor: 'Minor',
};

const rank: Record<Classification, number> = { minor: 0, major: 1, critical: 2 };

export const isLowerClassification = (a: Classification, b: Classification): boolean => rank[a] < rank[b];

const higher = (a: Classification, b: Classification): Classification => (rank[a] >= rank[b] ? a : b);

export interface ClassifyInput {
  defaultClassification: Classification;
  severity: number;
  occurrence: number;
  detection: number;
  /** The class the investigator picked, when it differs from the computed one. */
  chosen?: Classification | null;
}

export interface ClassificationResult {
  /** The class to record: the chosen one when given, else the computed one. */
  classification: Classification;
  /** What the catalogue default and the score give. */
  computed: Classification;
  actionPriority: ActionPriority;
  reason: string;
  /** True when the class to record is below the computed one: a written justification is required. */
  overrideJustificationRequired: boolean;
  /** Critical deviations put the batch in quarantine before anything else. */
  quarantine: boolean;
}

/** A quarantine reminder for a deviation that became critical through its score, not its defect. */
export const quarantineCaution =
  'Critical: stop the line and quarantine the batch in process and any finished containers from it first. ' +
  'Nothing is released, reworked or destroyed without QA authorisation.';

function computedClass(input: ClassifyInput, ap: ActionPriority): { computed: Classification; reason: string } {
  const base = input.defaultClassification;
  const baseText = `The defect's catalogue class is ${base}.`;
  if (input.severity >= 9) {
    return base === 'critical'
      ? { computed: 'critical', reason: `${baseText} Severity ${input.severity} (9-10) also makes it critical.` }
      : { computed: 'critical', reason: `${baseText} Raised to critical: severity ${input.severity} is 9 or 10.` };
  }
  if (ap === 'high') {
    const computed = higher(base, 'major');
    return computed === base
      ? { computed, reason: `${baseText} Action priority is high; the class stays ${base}.` }
      : { computed, reason: `${baseText} Raised to major: action priority is high.` };
  }
  return { computed: base, reason: `${baseText} The score (action priority ${ap}) does not raise it.` };
}

export function classify(input: ClassifyInput): ClassificationResult {
  assertRiskScore(input.severity, 'severity');
  assertRiskScore(input.occurrence, 'occurrence');
  assertRiskScore(input.detection, 'detection');
  const ap = actionPriority(input.severity, input.occurrence, input.detection);
  const { computed, reason } = computedClass(input, ap);
  const chosen = input.chosen ?? computed;
  const lowered = isLowerClassification(chosen, computed);
  let fullReason = reason;
  if (lowered) {
    fullReason += ` Set to ${chosen} by the investigator, below the computed ${computed}: a written justification is required.`;
  } else if (chosen !== computed) {
    fullReason += ` Set to ${chosen} by the investigator, above the computed ${computed}.`;
  }
  return {
    classification: chosen,
    computed,
    actionPriority: ap,
    reason: fullReason,
    overrideJustificationRequired: lowered,
    quarantine: chosen === 'critical',
  };
}
