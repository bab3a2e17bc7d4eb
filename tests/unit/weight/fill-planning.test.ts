import { describe, expect, it } from 'vitest';
import { capsuleSizeOrder, capsuleVolumeMl, expectedFillMg, sanityCheckTarget } from '@/lib/weight/fill-planning';

/*
 * Capsule body volumes: UNC Eshelman School of Pharmacy teaching table "Hard Gelatin Capsules"
 * (pharmlabs.unc.edu). Bands for "fits / tight / overfull / underfilled": common practice.
 */

describe('fill-weight planning', () => {
  it('has a volume for every size 000 to 5, larger sizes holding more', () => {
    expect(capsuleSizeOrder).toEqual(['000', '00', '0', '1', '2', '3', '4', '5']);
    const volumes = capsuleSizeOrder.map((s) => capsuleVolumeMl[s]);
    expect([...volumes].sort((a, b) => b - a)).toEqual(volumes);
  });

  it('holds the volumes of the UNC teaching table (000 1.37 mL … 5 0.13 mL)', () => {
    // pharmlabs.unc.edu/labs/capsules/gelatin.htm, "Hard Gelatin Capsules", volume column.
    expect(capsuleVolumeMl).toEqual({ '000': 1.37, '00': 0.95, '0': 0.68, '1': 0.5, '2': 0.37, '3': 0.3, '4': 0.2, '5': 0.13 });
  });

  it('expected fill = volume × tapped density (size 0: 0.68 mL × 0.8 g/mL = 544 mg)', () => {
    expect(expectedFillMg('0', 0.8)).toBeCloseTo(544, 9);
    expect(expectedFillMg('00', 0.5)).toBeCloseTo(475, 9);
  });

  it.each([
    [700, 'overfull'],
    [560, 'tight'],
    [517, 'tight'],
    [450, 'fits'],
    [320, 'underfilled'],
  ] as const)('a size 0 target of %i mg at 0.8 g/mL is %s', (target, fit) => {
    const r = sanityCheckTarget({ capsuleSize: '0', targetFillMg: target }, 0.8);
    expect(r.fit).toBe(fit);
    expect(r.expectedMg).toBeCloseTo(544, 9);
    expect(r.message).toContain(`${Math.round((target / 544) * 100)} %`);
  });
});
