import { assertRiskScore } from './scales';

/*
 * Risk priority number, RPN = S × O × D (IEC 60812:2018, the RPN method). It ranges from 1 to 1000
 * and is shown for reference only: the same RPN can hide very different risks (S 10 × O 1 × D 1 and
 * S 1 × O 10 × D 1 both give 10), which is why action priority, not RPN, decides what to do first.
 */

export const rpnMin = 1;
export const rpnMax = 1000;

export function rpn(severity: number, occurrence: number, detection: number): number {
  assertRiskScore(severity, 'severity');
  assertRiskScore(occurrence, 'occurrence');
  assertRiskScore(detection, 'detection');
  return severity * occurrence * detection;
}
