import { actionPriorityCell, type ActionPriorityCell } from './action-priority';
import { classify, type Classification, type ClassificationResult } from './classify';
import { matrixPosition, type MatrixPosition } from './matrix';
import { rpn } from './rpn';

/* Everything a screen shows for one S, O, D score, computed in one call (cheap: table look-ups). */

export interface RiskAssessmentInput {
  defaultClassification: Classification;
  severity: number;
  occurrence: number;
  detection: number;
  chosen?: Classification | null;
}

export interface RiskAssessment {
  rpn: number;
  actionPriority: ActionPriorityCell;
  matrix: MatrixPosition;
  classification: ClassificationResult;
}

export function assessRisk(input: RiskAssessmentInput): RiskAssessment {
  return {
    rpn: rpn(input.severity, input.occurrence, input.detection),
    actionPriority: actionPriorityCell(input.severity, input.occurrence, input.detection),
    matrix: matrixPosition(input.severity, input.occurrence),
    classification: classify(input),
  };
}
