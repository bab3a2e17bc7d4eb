/*
 * Adjustment hints for a semi-automatic (auger-fed) capsule filler when a weight check fails.
 * Facts of the trade, common practice with no published source: the auger pushes powder into the
 * body while the fill table turns the ring under it, so a faster auger or a slower table puts more
 * powder in each body. Speeds are adjusted first; the dosing-shoe clearance (normally about
 * 0.003 in, roughly a sheet of paper) only after, and only with the machine stopped, its power off
 * and isolated per the site's procedure.
 */

export type FillDirection = 'light' | 'heavy' | 'spread';

export interface AdjustmentHint {
  text: string;
  /** A safety caution rather than an adjustment. */
  caution?: boolean;
}

export const hintSource = 'Common practice for semi-automatic capsule fillers (no published source).';

/**
 * Which way the fill is off: the mean against the target beyond a small dead band, otherwise the
 * failure is the spread between capsules.
 */
export function fillDirection(meanMg: number, targetMg: number, deadBandPercent = 1): FillDirection {
  const off = ((meanMg - targetMg) / targetMg) * 100;
  if (off < -deadBandPercent) return 'light';
  if (off > deadBandPercent) return 'heavy';
  return 'spread';
}

export function adjustmentHints(direction: FillDirection): AdjustmentHint[] {
  const hints: AdjustmentHint[] = [];
  if (direction === 'light') {
    hints.push({ text: 'Capsules are light: speed the auger up a step, or slow the fill table — either puts more powder in each body.' });
  } else if (direction === 'heavy') {
    hints.push({ text: 'Capsules are heavy: slow the auger a step, or speed the fill table up — either puts less powder in each body.' });
  } else {
    hints.push({ text: 'The mean is on target but capsules vary: keep the hopper level steady, check the powder flows evenly, and look for a dented or worn ring.' });
  }
  hints.push({ text: 'Adjust auger and fill-table speed, re-check, and only then consider the dosing-shoe clearance (normally about 0.003 in, roughly a sheet of paper).' });
  hints.push({
    text: "Change the dosing-shoe clearance only with the machine's power off and isolated per the site's procedure. Never bypass or defeat an interlock.",
    caution: true,
  });
  return hints;
}
