/*
 * Fill-weight planning: how much powder a capsule size holds at the powder's tapped bulk density.
 * Nominal body-fill volumes (mL) from the teaching table "Hard Gelatin Capsules" of the UNC
 * Eshelman School of Pharmacy pharmaceutics labs (pharmlabs.unc.edu/labs/capsules/gelatin.htm):
 * 000 1.37, 00 0.95, 0 0.68, 1 0.50, 2 0.37, 3 0.30, 4 0.20, 5 0.13. Shell makers publish slightly
 * different figures per size; sizes are the same for gelatin and HPMC shells.
 */

/** Where the nominal volumes come from, for the screen to cite beside the planning line. */
export const capsuleVolumeSource = 'UNC Eshelman School of Pharmacy, pharmaceutics labs, "Hard Gelatin Capsules" table';

export const capsuleSizeOrder = ['000', '00', '0', '1', '2', '3', '4', '5'] as const;
export type CapsuleSize = (typeof capsuleSizeOrder)[number];

export const capsuleVolumeMl: Readonly<Record<CapsuleSize, number>> = {
  '000': 1.37,
  '00': 0.95,
  '0': 0.68,
  '1': 0.5,
  '2': 0.37,
  '3': 0.3,
  '4': 0.2,
  '5': 0.13,
};

/** Expected fill in mg: volume (mL) × tapped density (g/mL) × 1000. */
export function expectedFillMg(size: CapsuleSize, tappedDensityGPerMl: number): number {
  return capsuleVolumeMl[size] * tappedDensityGPerMl * 1000;
}

/*
 * Bands for the target against the expected fill (common practice, no published source): an
 * auger or semi-automatic filler fills close to tapped density, so a target well above it will not
 * go in without compaction, and a target far below it leaves a partly filled body that settles and
 * fills unevenly.
 */
export const fillBands = { overfull: 1.05, tight: 0.95, underfilled: 0.6 } as const;

export type FillFit = 'overfull' | 'tight' | 'fits' | 'underfilled';

export interface TargetCheck {
  size: CapsuleSize;
  volumeMl: number;
  expectedMg: number;
  /** Target as a fraction of the expected fill. */
  ratio: number;
  fit: FillFit;
  message: string;
}

export function sanityCheckTarget(
  product: { capsuleSize: CapsuleSize; targetFillMg: number },
  tappedDensityGPerMl: number,
): TargetCheck {
  const size = product.capsuleSize;
  const expectedMg = expectedFillMg(size, tappedDensityGPerMl);
  const ratio = product.targetFillMg / expectedMg;
  const pct = Math.round(ratio * 100);
  const base = { size, volumeMl: capsuleVolumeMl[size], expectedMg, ratio };
  if (ratio > fillBands.overfull) {
    return { ...base, fit: 'overfull', message: `The target is ${pct} % of what a size ${size} holds at this tapped density: it needs compaction or a larger size.` };
  }
  if (ratio >= fillBands.tight) {
    return { ...base, fit: 'tight', message: `The target is ${pct} % of a size ${size} at tapped density: it fits only just; expect heavy/light swings.` };
  }
  if (ratio < fillBands.underfilled) {
    return { ...base, fit: 'underfilled', message: `The target is ${pct} % of a size ${size} at tapped density: consider a smaller size or a filler.` };
  }
  return { ...base, fit: 'fits', message: `The target is ${pct} % of a size ${size} at tapped density.` };
}
