import { beyond, mean, percentDeviation } from './stats';

/*
 * USP <2091> Weight Variation of Dietary Supplements, section Capsules, "Hard Shell Capsules"
 * ("Hard Capsules" in USP 32–NF 27; the procedure is unchanged in the revision official
 * 1 December 2019). Checked against the published chapter text. In our words:
 *
 *   Screen: 20 intact capsules weighed one by one; if each gross mass lies within 90 %–110 % of
 *     their average, the requirement is met.
 *   Stage 1: otherwise the same 20 are emptied and each net content is gross minus its own shell.
 *     Met when at most 2 net contents differ from the average net content by more than 10 % and
 *     none by more than 25 %.
 *   Stage 2: when more than 2 but at most 6 lie between 10 % and 25 % from the average, 40 more
 *     capsules are emptied; against the average of all 60, met when at most 6 differ by more
 *     than 10 % and none by more than 25 %.
 */

export const usp2091Stage1Size = 20;
export const usp2091Stage2Size = 60;
/** USP <2091>, Hard Shell Capsules: the intact-capsule screen, ±10 % of the average gross mass. */
export const usp2091ScreenPercent = 10;
/** USP <2091>, Hard Shell Capsules: net-content limits, 10 % (a few allowed) and 25 % (none allowed). */
export const usp2091Percent = 10;
export const usp2091OuterPercent = 25;
/** USP <2091>, Hard Shell Capsules: 2 of 20 beyond 10 % allowed; 3 to 6 send the test to 60 units, of which 6 may be beyond. */
export const usp2091Stage1Allowed = 2;
export const usp2091Stage2Trigger = 6;
export const usp2091Stage2Allowed = 6;

export interface Usp2091Count {
  n: number;
  averageMg: number;
  beyondPercent: number[];
  beyondOuter: number[];
}

export interface Usp2091Result {
  method: 'usp_2091';
  status: 'pass' | 'fail' | 'incomplete';
  required: number;
  given: number;
  /** The intact-capsule screen; null when only net masses were entered. */
  screen: { averageMg: number; outside: number[]; passes: boolean } | null;
  stage1: Usp2091Count | null;
  stage2: Usp2091Count | null;
  /** What decided the outcome, in words. */
  decidedBy: 'screen' | 'stage_1' | 'stage_2' | 'more_units';
}

function count(netMg: readonly number[]): Usp2091Count {
  const averageMg = mean(netMg);
  const beyondPercent: number[] = [];
  const beyondOuter: number[] = [];
  netMg.forEach((x, i) => {
    const dev = percentDeviation(x, averageMg);
    if (beyond(dev, usp2091Percent)) beyondPercent.push(i);
    if (beyond(dev, usp2091OuterPercent)) beyondOuter.push(i);
  });
  return { n: netMg.length, averageMg, beyondPercent, beyondOuter };
}

/**
 * `grossMg` are intact-capsule masses when they were weighed (null when only net masses exist);
 * `netMg` are the content masses of the same units, in the same order.
 */
export function evaluateUsp2091(grossMg: readonly number[] | null, netMg: readonly number[]): Usp2091Result {
  const base = { method: 'usp_2091' as const, given: netMg.length };
  if (netMg.length < usp2091Stage1Size) {
    return { ...base, status: 'incomplete', required: usp2091Stage1Size, screen: null, stage1: null, stage2: null, decidedBy: 'more_units' };
  }
  let screen: Usp2091Result['screen'] = null;
  if (grossMg) {
    const units = grossMg.slice(0, usp2091Stage1Size);
    const averageMg = mean(units);
    const outside = units.flatMap((x, i) => (beyond(percentDeviation(x, averageMg), usp2091ScreenPercent) ? [i] : []));
    screen = { averageMg, outside, passes: outside.length === 0 };
    if (screen.passes) {
      return { ...base, status: 'pass', required: usp2091Stage1Size, screen, stage1: null, stage2: null, decidedBy: 'screen' };
    }
  }
  const stage1 = count(netMg.slice(0, usp2091Stage1Size));
  if (stage1.beyondOuter.length > 0 || stage1.beyondPercent.length > usp2091Stage2Trigger) {
    return { ...base, status: 'fail', required: usp2091Stage1Size, screen, stage1, stage2: null, decidedBy: 'stage_1' };
  }
  if (stage1.beyondPercent.length <= usp2091Stage1Allowed) {
    return { ...base, status: 'pass', required: usp2091Stage1Size, screen, stage1, stage2: null, decidedBy: 'stage_1' };
  }
  if (netMg.length < usp2091Stage2Size) {
    return { ...base, status: 'incomplete', required: usp2091Stage2Size, screen, stage1, stage2: null, decidedBy: 'more_units' };
  }
  const stage2 = count(netMg.slice(0, usp2091Stage2Size));
  const passes = stage2.beyondOuter.length === 0 && stage2.beyondPercent.length <= usp2091Stage2Allowed;
  return { ...base, status: passes ? 'pass' : 'fail', required: usp2091Stage2Size, screen, stage1, stage2, decidedBy: 'stage_2' };
}
