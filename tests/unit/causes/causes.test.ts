import { describe, expect, it } from 'vitest';
import { defectCatalogue } from '../../../scripts/seed/defect-catalogue';
import {
  causeBranches,
  causes,
  causesByDefect,
  fishboneFor,
  gelatinShellMoisturePercent,
  hasProbableCauses,
  probableCauses,
  vacuumRangeInHg,
} from '../../../lib/causes';

const ids = (code: string) => probableCauses(code).map((c) => c.id);
const text = (code: string) => probableCauses(code).map((c) => `${c.cause} ${c.check}`).join('\n');

describe('probable causes data', () => {
  it('gives every defect in the catalogue at least two causes, and knows no code outside it', () => {
    for (const d of defectCatalogue) {
      expect(probableCauses(d.code).length, d.code).toBeGreaterThanOrEqual(2);
    }
    expect(Object.keys(causesByDefect).sort()).toEqual(defectCatalogue.map((d) => d.code).sort());
  });

  it('puts every cause on exactly one of the six cause-and-effect branches, with a check to make', () => {
    expect(causeBranches).toEqual(['method', 'machine', 'material', 'measurement', 'people', 'environment']);
    for (const c of Object.values(causes)) {
      expect(causeBranches, c.id).toContain(c.branch);
      expect(c.check.length, c.id).toBeGreaterThan(10);
    }
    expect(new Set(Object.values(causes).map((c) => c.id)).size).toBe(Object.values(causes).length);
  });

  // Facts of the trade for semi-automatic fillers: common practice unless marked otherwise.
  it('vacuum too high → cracked or broken bodies, bodies bouncing (common practice)', () => {
    expect(ids('cracked_shell')).toContain('vacuum_too_high');
    expect(ids('broken_body')).toContain('vacuum_too_high');
    expect(causes.vacuumTooHigh.cause).toMatch(/bounce/);
  });

  it('vacuum too low → unseparated capsules, rings run over the vacuum several times (common practice)', () => {
    expect(ids('unseparated')).toContain('vacuum_too_low');
    expect(causes.vacuumTooLow.cause).toMatch(/run over the vacuum several times/);
  });

  it('vacuum gauge normally 9–12 inHg; another shell maker may need a setting outside it (common practice)', () => {
    expect(vacuumRangeInHg).toEqual({ low: 9, high: 12 });
    expect(causes.vacuumTooHigh.check).toMatch(/9–12 inHg/);
    expect(causes.shellMakerChange.cause).toMatch(/different shell maker.*outside the usual 9–12 inHg/);
    expect(ids('unseparated')).toContain('shell_maker_change');
  });

  it('dented filling rings → poor vacuum seal and uneven fills (common practice)', () => {
    expect(causes.dentedRing.cause).toMatch(/does not seal/);
    for (const code of ['unseparated', 'light_fill', 'heavy_fill']) expect(ids(code)).toContain('dented_ring');
  });

  it('bodies standing proud of the ring → sheared by the powder station (common practice)', () => {
    expect(causes.bodiesProud.cause).toMatch(/powder station shears/);
    expect(ids('broken_body')).toContain('bodies_proud');
  });

  it('excess powder left on the ring before closing → powder on the shell (common practice)', () => {
    expect(ids('powder_outside')).toContain('excess_powder_on_ring');
  });

  it('auger/table speed and dosing-shoe clearance → light or heavy fills (common practice)', () => {
    for (const code of ['light_fill', 'heavy_fill']) {
      expect(ids(code)).toEqual(expect.arrayContaining(['auger_speed', 'table_speed', 'dosing_shoe_clearance']));
    }
    expect(causes.augerSpeed.cause).toMatch(/faster auger gives heavier capsules, a slower one lighter/);
    expect(causes.tableSpeed.cause).toMatch(/faster table gives lighter capsules, a slower one heavier/);
    expect(causes.dosingShoeClearance.cause).toMatch(/0\.003 in/);
    expect(causes.dosingShoeClearance.check).toMatch(/power off/);
  });

  it('shells too dry → brittle; gelatin shells about 13–16 % moisture (from memory, shell makers’ literature)', () => {
    expect(gelatinShellMoisturePercent).toEqual({ low: 13, high: 16 });
    expect(causes.shellsTooDry.cause).toMatch(/brittle.*13–16 % moisture/);
    expect(causes.shellsTooDry.basis).toBe('from memory');
    expect(ids('cracked_shell')).toContain('shells_too_dry');
  });

  it('an open rectifier door or panel trips an interlock and stops the machine, with the never-defeat caution', () => {
    expect(causes.interlockStop.cause).toMatch(/rectifier door or maintenance panel/);
    expect(causes.interlockStop.cautions).toEqual(['interlock', 'power_isolated']);
    const view = fishboneFor('empty_capsule');
    expect(view.cautions.map((c) => c.id)).toEqual(['interlock', 'power_isolated']);
    expect(view.cautions[0]!.text).toMatch(/Never defeat/);
  });
});

describe('the cause-and-effect view', () => {
  it('always has the six branches in order, empty ones included', () => {
    const view = fishboneFor('print_colour');
    expect(view.branches.map((b) => b.branch)).toEqual([...causeBranches]);
    expect(view.branches.find((b) => b.branch === 'machine')!.causes).toEqual([]);
    expect(view.branches.flatMap((b) => b.causes)).toHaveLength(probableCauses('print_colour').length);
    expect(view.cautions).toEqual([]);
  });

  it('puts the quarantine caution first for a critical defect', () => {
    expect(fishboneFor('foreign_matter', { critical: true }).cautions.map((c) => c.id)).toEqual(['quarantine', 'power_isolated']);
  });

  it('answers an unknown code with no causes rather than failing', () => {
    expect(hasProbableCauses('no_such_defect')).toBe(false);
    expect(hasProbableCauses('light_fill')).toBe(true);
    expect(fishboneFor('no_such_defect').branches.every((b) => b.causes.length === 0)).toBe(true);
    expect(text('light_fill')).toMatch(/hopper/);
  });
});
