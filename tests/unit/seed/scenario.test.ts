import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { batchStatuses, classifications, ringConditions } from '@/db/schema';
import { demoPassword, demoUsers } from '@/scripts/seed/demo-users';
import { mulberry32 } from '@/scripts/seed/prng';
import { buildDemoScenario, scenarioEnd, scenarioStart } from '@/scripts/seed/scenario';
import { capsuleVolumeMl, sanityCheckTarget } from '@/lib/weight/fill-planning';

const scenario = buildDemoScenario();
const byCode = <T extends { code: string }>(rows: readonly T[], code: string) => rows.find((r) => r.code === code)!;

describe('demo scenario determinism', () => {
  afterEach(() => vi.restoreAllMocks());

  it('builds the same scenario every time', () => {
    expect(buildDemoScenario()).toEqual(buildDemoScenario());
    expect(JSON.stringify(buildDemoScenario())).toBe(JSON.stringify(scenario));
  });

  it('uses neither Math.random nor the clock', () => {
    vi.spyOn(Math, 'random').mockImplementation(() => {
      throw new Error('Math.random used');
    });
    vi.spyOn(Date, 'now').mockImplementation(() => {
      throw new Error('Date.now used');
    });
    expect(buildDemoScenario()).toEqual(scenario);
  });

  it('mulberry32 repeats for a seed, differs between seeds and stays in [0, 1)', () => {
    const a = mulberry32(42);
    const b = mulberry32(42);
    const c = mulberry32(43);
    const seqA = Array.from({ length: 1000 }, a);
    expect(Array.from({ length: 1000 }, b)).toEqual(seqA);
    expect(Array.from({ length: 1000 }, c)).not.toEqual(seqA);
    expect(seqA.every((x) => x >= 0 && x < 1)).toBe(true);
    // Roughly uniform: the mean of 1000 draws is near 0.5.
    expect(seqA.reduce((s, x) => s + x, 0) / seqA.length).toBeGreaterThan(0.45);
    expect(seqA.reduce((s, x) => s + x, 0) / seqA.length).toBeLessThan(0.55);
  });
});

describe('demo users', () => {
  // The sign-in table in DEVELOPERS.md is what people and browser tests use; the seed must match it.
  const guide = readFileSync(path.join(__dirname, '../../../DEVELOPERS.md'), 'utf8');
  const roleFromLabel = (label: string) => {
    const l = label.toLowerCase();
    if (l.startsWith('operator')) return 'operator';
    if (l.startsWith('supervisor')) return 'supervisor';
    if (l.startsWith('qa investigator')) return 'qa_investigator';
    if (l.startsWith('qa approver')) return 'qa_approver';
    if (l.startsWith('administrator')) return 'admin';
    return `unknown: ${label}`;
  };
  const documented = [...guide.matchAll(/^\|\s*([^|]+?)\s*\|\s*(\S+@brackwater\.example)\s*\|\s*([^|]+?)\s*\|$/gm)].map((m) => ({
    email: m[2],
    name: m[3],
    role: roleFromLabel(m[1]!),
  }));

  it('match the demo sign-in table in DEVELOPERS.md exactly', () => {
    expect(documented).toHaveLength(7);
    expect(demoUsers.map(({ email, name, role }) => ({ email, name, role }))).toEqual(documented);
  });

  it('share the documented password and have a printed title each', () => {
    expect(guide).toContain(`\`${demoPassword}\``);
    expect(demoPassword).toBe('capsule-demo-2026');
    expect(demoUsers.every((u) => u.title.trim().length > 0)).toBe(true);
  });

  it('use the fictional brackwater.example domain only', () => {
    expect(demoUsers.every((u) => u.email.endsWith('@brackwater.example'))).toBe(true);
    expect(scenario.company).toEqual({ name: 'Brackwater Capsule Co.', domain: 'brackwater.example' });
  });
});

describe('capsule defect catalogue (classifications: common practice)', () => {
  const required = [
    'Cracked or split shell',
    'Broken body',
    'Dented shell',
    'Light fill',
    'Heavy fill',
    'Empty capsule',
    'Unseparated capsule',
    'Unjoined or open capsule',
    'Telescoped capsule',
    'Double cap',
    'Powder on outside of shell',
    'Foreign matter',
    'Wrong product or mix-up',
    'Print or colour defect',
  ];

  it('contains every defect a capsule line reports', () => {
    const names = scenario.defects.map((d) => d.name);
    for (const name of required) expect(names).toContain(name);
  });

  it('gives each defect a description, a classification and a 1-10 severity, with unique codes', () => {
    const codes = new Set(scenario.defects.map((d) => d.code));
    expect(codes.size).toBe(scenario.defects.length);
    for (const d of scenario.defects) {
      expect(d.description.length).toBeGreaterThan(20);
      expect(classifications).toContain(d.defaultClassification);
      expect(Number.isInteger(d.defaultSeverity)).toBe(true);
      expect(d.defaultSeverity).toBeGreaterThanOrEqual(1);
      expect(d.defaultSeverity).toBeLessThanOrEqual(10);
      expect(d.code).toMatch(/^[a-z][a-z0-9_]{1,31}$/);
    }
  });

  it('treats foreign matter, mix-up and empty capsules as critical with a quarantine-first caution', () => {
    const critical = scenario.defects.filter((d) => d.defaultClassification === 'critical').map((d) => d.code);
    expect(critical.sort()).toEqual(['empty_capsule', 'foreign_matter', 'mix_up']);
    for (const code of critical) {
      const d = byCode(scenario.defects, code);
      expect(d.caution).toMatch(/quarantine/i);
      expect(d.defaultSeverity).toBeGreaterThanOrEqual(8);
    }
    // A caution on a non-critical defect would dilute the critical ones.
    expect(scenario.defects.filter((d) => d.defaultClassification !== 'critical').every((d) => d.caution === null)).toBe(true);
  });

  it('ranks a mix-up above foreign matter above an empty capsule, and all critical above any major', () => {
    const sev = (code: string) => byCode(scenario.defects, code).defaultSeverity;
    expect(sev('mix_up')).toBeGreaterThan(sev('foreign_matter'));
    expect(sev('foreign_matter')).toBeGreaterThan(sev('empty_capsule'));
    const maxMajor = Math.max(...scenario.defects.filter((d) => d.defaultClassification === 'major').map((d) => d.defaultSeverity));
    expect(sev('empty_capsule')).toBeGreaterThan(maxMajor);
  });
});

describe('products', () => {
  it('cover capsule sizes 00, 0 and 1 in gelatin and HPMC, with at least one drug (21 CFR 211) product', () => {
    expect(new Set(scenario.products.map((p) => p.capsuleSize))).toEqual(new Set(['00', '0', '1']));
    expect(new Set(scenario.products.map((p) => p.shellMaterial))).toEqual(new Set(['gelatin', 'hpmc']));
    expect(scenario.products.filter((p) => p.regulatoryClass === 'drug').length).toBeGreaterThanOrEqual(1);
    expect(scenario.products.filter((p) => p.regulatoryClass === 'supplement').length).toBeGreaterThanOrEqual(3);
  });

  it('have fill targets a powder can physically reach in the capsule (apparent density 0.3-1.2 g/mL)', () => {
    // Capsule volumes: UNC Eshelman School of Pharmacy teaching table (lib/weight/fill-planning.ts).
    // 0.3-1.2 g/mL spans the tapped densities of common capsule powders (common practice).
    for (const p of scenario.products) {
      const density = p.targetFillMg / (capsuleVolumeMl[p.capsuleSize] * 1000);
      expect(density, p.code).toBeGreaterThanOrEqual(0.3);
      expect(density, p.code).toBeLessThanOrEqual(1.2);
    }
  });

  it('carry tapped densities of 0.4-0.9 g/mL that fit their targets, with vitamin C the one tight product', () => {
    // Range of common capsule fill powders and the fill bands of lib/weight/fill-planning.ts
    // (common practice); the demo shows the planning warning on one product only.
    for (const p of scenario.products) {
      expect(p.tappedDensityGPerMl, p.code).toBeGreaterThanOrEqual(0.4);
      expect(p.tappedDensityGPerMl, p.code).toBeLessThanOrEqual(0.9);
    }
    const fits = scenario.products.map((p) => [p.code, sanityCheckTarget(p, p.tappedDensityGPerMl).fit]);
    expect(fits.filter(([, fit]) => fit !== 'fits')).toEqual([['BW-ASC-0', 'tight']]);
  });

  it('keep fill limits around the target and no wider than Ph. Eur. 2.9.5 (10 % below 300 mg, 7.5 % from 300 mg)', () => {
    for (const p of scenario.products) {
      const allowed = p.targetFillMg < 300 ? 0.1 : 0.075;
      expect(p.fillLowerMg, p.code).toBeLessThan(p.targetFillMg);
      expect(p.fillUpperMg, p.code).toBeGreaterThan(p.targetFillMg);
      expect(p.targetFillMg - p.fillLowerMg, p.code).toBeLessThanOrEqual(p.targetFillMg * allowed + 1e-9);
      expect(p.fillUpperMg - p.targetFillMg, p.code).toBeLessThanOrEqual(p.targetFillMg * allowed + 1e-9);
    }
  });

  it('have unique codes', () => {
    expect(new Set(scenario.products.map((p) => p.code)).size).toBe(scenario.products.length);
  });
});

describe('machines and filling rings', () => {
  it('places 3-4 fillers in Filling Room A and Filling Room B', () => {
    expect(scenario.machines.length).toBeGreaterThanOrEqual(3);
    expect(scenario.machines.length).toBeLessThanOrEqual(4);
    expect(new Set(scenario.machines.map((m) => m.room))).toEqual(new Set(['Filling Room A', 'Filling Room B']));
  });

  it('has a dozen rings, each on a filler that takes its size, with worn or dented ones and one retired', () => {
    expect(scenario.rings).toHaveLength(12);
    expect(new Set(scenario.rings.map((r) => r.serial)).size).toBe(12);
    for (const r of scenario.rings) {
      const m = scenario.machines.find((x) => x.assetTag === r.machineAssetTag);
      expect(m?.capsuleSizes, r.serial).toContain(r.capsuleSize);
      expect(ringConditions).toContain(r.condition);
    }
    expect(scenario.rings.filter((r) => r.condition === 'worn' || r.condition === 'dented').length).toBeGreaterThanOrEqual(2);
    const retired = scenario.rings.filter((r) => r.status === 'retired');
    expect(retired).toHaveLength(1);
    expect(retired[0]!.retiredAt).not.toBeNull();
    expect(retired[0]!.statusReason).toBeTruthy();
    // Only a retired ring carries a retirement date.
    expect(scenario.rings.filter((r) => r.status !== 'retired').every((r) => r.retiredAt === null)).toBe(true);
  });
});

describe('batches', () => {
  const { batches } = scenario;

  it('span the scenario window on working days, with unique lot numbers in the BW-YYYY-MMDD-X format', () => {
    expect(batches.length).toBeGreaterThan(60);
    expect(new Set(batches.map((b) => b.lotNumber)).size).toBe(batches.length);
    for (const b of batches) {
      expect(b.lotNumber).toMatch(/^BW-\d{4}-\d{4}-[A-Z]$/);
      expect(b.lotNumber.slice(3, 12)).toBe(`${b.manufacturedOn.slice(0, 4)}-${b.manufacturedOn.slice(5, 7)}${b.manufacturedOn.slice(8, 10)}`);
      expect(b.manufacturedOn >= scenarioStart && b.manufacturedOn <= scenarioEnd).toBe(true);
      expect([0, 6]).not.toContain(new Date(`${b.manufacturedOn}T00:00:00Z`).getUTCDay());
      expect(b.expiresOn > b.manufacturedOn).toBe(true);
    }
    expect(batches[0]!.manufacturedOn.slice(0, 7)).toBe('2026-07');
    expect(batches[batches.length - 1]!.manufacturedOn.slice(0, 7)).toBe('2026-11');
  });

  it('run each batch on a filler and an in-service ring that fit the product', () => {
    for (const b of batches) {
      const product = scenario.products.find((p) => p.code === b.productCode)!;
      const machine = scenario.machines.find((m) => m.assetTag === b.machineAssetTag)!;
      const ring = scenario.rings.find((r) => r.serial === b.ringSerial)!;
      expect(machine.capsuleSizes, b.lotNumber).toContain(product.capsuleSize);
      expect(ring.machineAssetTag, b.lotNumber).toBe(machine.assetTag);
      expect(ring.capsuleSize, b.lotNumber).toBe(product.capsuleSize);
      if (ring.retiredAt) expect(b.manufacturedOn < ring.retiredAt.slice(0, 10), b.lotNumber).toBe(true);
    }
  });

  it('hold 50,000-300,000 capsules, and only released batches have shipped units', () => {
    for (const b of batches) {
      expect(b.sizeCapsules).toBeGreaterThanOrEqual(50_000);
      expect(b.sizeCapsules).toBeLessThanOrEqual(300_000);
      expect(b.unitsShipped).toBeLessThanOrEqual(b.sizeCapsules);
      if (b.status === 'released') expect(b.unitsShipped).toBeGreaterThan(0);
      else expect(b.unitsShipped).toBe(0);
    }
  });

  it('are mostly released, some in process, one or two on hold and one rejected', () => {
    const count = (s: (typeof batchStatuses)[number]) => batches.filter((b) => b.status === s).length;
    expect(count('released')).toBeGreaterThan(batches.length / 2);
    expect(count('in_process')).toBeGreaterThanOrEqual(2);
    expect(count('on_hold')).toBeGreaterThanOrEqual(1);
    expect(count('on_hold')).toBeLessThanOrEqual(2);
    expect(count('rejected')).toBe(1);
    // In-process batches are the newest ones.
    const newestReleased = batches.filter((b) => b.status === 'released').at(-1)!.manufacturedOn;
    expect(batches.filter((b) => b.status === 'in_process').every((b) => b.manufacturedOn > newestReleased)).toBe(true);
  });

  it('use every product and every in-service ring at least once', () => {
    const used = new Set(batches.map((b) => b.productCode));
    for (const p of scenario.products) expect(used, p.code).toContain(p.code);
    const rings = new Set(batches.map((b) => b.ringSerial));
    for (const r of scenario.rings.filter((x) => x.status === 'in_service')) expect(rings, r.serial).toContain(r.serial);
  });
});

describe('settings', () => {
  it('name the site and give approval links seven days', () => {
    expect(scenario.settings).toEqual(
      expect.arrayContaining([
        { key: 'site_name', value: 'Brackwater Capsule Co.' },
        { key: 'approval_link_days', value: '7' },
      ]),
    );
  });
});
