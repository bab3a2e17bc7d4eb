import type { capsuleSizes } from '../../db/schema';

/*
 * Approximate fill volume of each standard hard-capsule size, in mL. Values from the teaching table
 * "Hard Gelatin Capsules" of the UNC Eshelman School of Pharmacy pharmaceutics labs
 * (pharmlabs.unc.edu/labs/capsules/gelatin.htm): 000 1.37, 00 0.95, 0 0.68, 1 0.50, 2 0.37,
 * 3 0.30, 4 0.20, 5 0.13. Sizes are the same for gelatin and HPMC shells.
 */
export const capsuleVolumeMl: Record<(typeof capsuleSizes)[number], number> = {
  '000': 1.37,
  '00': 0.95,
  '0': 0.68,
  '1': 0.5,
  '2': 0.37,
  '3': 0.3,
  '4': 0.2,
  '5': 0.13,
};
