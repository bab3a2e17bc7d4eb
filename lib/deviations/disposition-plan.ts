import { type Aql, aqlValues, type InspectionLevel, inspectionLevels } from '../sampling/master-tables';
import { type SamplingPlan, type Severity, findSamplingPlan, severities } from '../sampling/plan';
import type { Disposition } from './labels';

/*
 * The rules of a batch disposition that both the form and the command apply, and the ISO 2859-1
 * plan a re-inspection follows. Pure, so the form shows the plan and the note hint as people type.
 */

/** General inspection level II and normal inspection are where ISO 2859-1 starts (clause 9.1, 10.1). */
export const defaultInspectionLevel: InspectionLevel = 'II';
export const defaultSeverity: Severity = 'normal';
/** Common practice for major capsule defects (cracked, split, light fill); sites set their own per defect class. */
export const defaultAql: Aql = '0.65';

export { aqlValues, inspectionLevels, severities };

/** Reject and rework destroy or change the batch: the record says why (21 CFR 211.192 written record). */
export function isNoteRequired(disposition: Disposition): boolean {
  return disposition === 'reject' || disposition === 'rework';
}

/**
 * Why a note is needed for this choice, or null. At approval, overruling the investigator's
 * recommendation (or deciding where none was made) needs the approver's reason as well.
 */
export function noteRequirement(disposition: Disposition, overruling: { recommended: Disposition | null } | null): string | null {
  if (isNoteRequired(disposition)) return `Say why the batch is to be ${disposition === 'reject' ? 'rejected' : 'reworked'}.`;
  if (overruling && overruling.recommended !== disposition) {
    return overruling.recommended === null
      ? 'No disposition was recommended: say why you decide this one.'
      : 'This differs from the recommended disposition: say why.';
  }
  return null;
}

export interface ReInspectionQuery {
  lotSize: number;
  level: InspectionLevel;
  aql: Aql;
  severity: Severity;
}

export type ReInspectionPlan = { ok: true; plan: SamplingPlan; summary: string } | { ok: false; message: string };

/** e.g. "ISO 2859-1 normal, level II, code letter L, n=200, AQL 0.65: Ac 3 Re 4" (fits the 120-character column). */
export function summarizePlan(plan: SamplingPlan, level: InspectionLevel): string {
  const letter = plan.arrow ? `code letter ${plan.letter} (arrow from ${plan.lookedUpLetter})` : `code letter ${plan.letter}`;
  const n = plan.hundredPercent ? `n=${plan.sampleSize} (whole lot)` : `n=${plan.sampleSize}`;
  return `ISO 2859-1 ${plan.severity}, level ${level}, ${letter}, ${n}, AQL ${plan.aql}: Ac ${plan.acceptance} Re ${plan.rejection}`;
}

export function reInspectionPlan(query: ReInspectionQuery): ReInspectionPlan {
  // ISO 2859-1 Table 1 starts at lots of 2; a smaller lot is simply inspected whole.
  if (!Number.isInteger(query.lotSize) || query.lotSize < 2) {
    return { ok: false, message: `The batch record gives a lot of ${query.lotSize} capsules: inspect it whole instead.` };
  }
  const found = findSamplingPlan(query);
  if (!found.ok) return { ok: false, message: found.reason };
  return { ok: true, plan: found.plan, summary: summarizePlan(found.plan, query.level) };
}
