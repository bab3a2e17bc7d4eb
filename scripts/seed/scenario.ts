import type { batchStatuses, capsuleSizes, ringConditions, shellMaterials } from '../../db/schema';
import type { RingState } from '../../workflows/states';
import { defectCatalogue, type DefectSeed } from './defect-catalogue';
import { demoUsers, type DemoUser } from './demo-users';
import { mulberry32, pick, randomInt, type Prng } from './prng';

/*
 * The demo scenario as plain data: Brackwater Capsule Co., two filling rooms, four semi-automatic
 * fillers, their filling rings, seven products and five months of batches. Built by a pure function
 * from a fixed seed and fixed dates, so every install shows the same lots and the same history, and
 * later issues can write stories against known lot numbers.
 */

type CapsuleSize = (typeof capsuleSizes)[number];

export const companyName = 'Brackwater Capsule Co.';
export const companyDomain = 'brackwater.example';

/** First and last manufacturing day of the demo batches (UTC dates). */
export const scenarioStart = '2026-07-01';
export const scenarioEnd = '2026-11-27';
const scenarioSeed = 0x5eed_2026;

export interface ProductSeed {
  code: string;
  name: string;
  strength: string;
  capsuleSize: CapsuleSize;
  shellMaterial: (typeof shellMaterials)[number];
  regulatoryClass: 'supplement' | 'drug';
  targetFillMg: number;
  fillLowerMg: number;
  fillUpperMg: number;
  /**
   * Tapped bulk density of the fill powder, g/mL, for fill-weight planning. Plausible values for
   * each kind of powder (common practice), chosen so the target fits its size; the vitamin C target
   * is deliberately tight in a size 0.
   */
  tappedDensityGPerMl: number;
  /** Expiry (supplements) or beyond-use date (the compounded drug) after manufacture. */
  shelfLifeMonths: number;
}

export interface MachineSeed {
  assetTag: string;
  name: string;
  room: string;
  model: string;
  capsuleSizes: CapsuleSize[];
}

export interface RingSeed {
  serial: string;
  machineAssetTag: string;
  capsuleSize: CapsuleSize;
  condition: (typeof ringConditions)[number];
  status: RingState;
  statusReason: string | null;
  /** ISO date-time (UTC) the ring was retired; batches from that day on do not use it. */
  retiredAt: string | null;
  /**
   * How a retired ring left service: who took it off the line and why, and the QA approver who
   * retired it (not the same person: lib/equipment/ring-kind.ts).
   */
  retirement: { quarantined: { at: string; by: string; reason: string }; retiredBy: string } | null;
}

export interface BatchSeed {
  lotNumber: string;
  productCode: string;
  machineAssetTag: string;
  ringSerial: string;
  sizeCapsules: number;
  /** Capsules shipped to customers so far (the same unit as the batch size). */
  unitsShipped: number;
  status: (typeof batchStatuses)[number];
  manufacturedOn: string;
  expiresOn: string;
}

export interface DemoScenario {
  company: { name: string; domain: string };
  settings: { key: string; value: string }[];
  users: readonly DemoUser[];
  products: ProductSeed[];
  machines: MachineSeed[];
  rings: RingSeed[];
  batches: BatchSeed[];
  defects: readonly DefectSeed[];
}

/**
 * Fill limits as a percentage of the target. Supplements use the Ph. Eur. 2.9.5 uniformity-of-mass
 * percentages for capsules (10 % below 300 mg, 7.5 % from 300 mg); the compounded drug carries a
 * tighter in-house limit.
 */
function product(p: Omit<ProductSeed, 'fillLowerMg' | 'fillUpperMg'> & { limitPercent?: number }): ProductSeed {
  const { limitPercent, ...rest } = p;
  const percent = limitPercent ?? (p.targetFillMg < 300 ? 10 : 7.5);
  const delta = (p.targetFillMg * percent) / 100;
  return {
    ...rest,
    fillLowerMg: Math.round((p.targetFillMg - delta) * 100) / 100,
    fillUpperMg: Math.round((p.targetFillMg + delta) * 100) / 100,
  };
}

const products: ProductSeed[] = [
  product({
    code: 'BW-MGG-00',
    name: 'Magnesium Glycinate',
    strength: '640 mg magnesium bisglycinate (about 90 mg elemental magnesium)',
    capsuleSize: '00',
    shellMaterial: 'gelatin',
    regulatoryClass: 'supplement',
    targetFillMg: 640,
    tappedDensityGPerMl: 0.8,
    shelfLifeMonths: 24,
  }),
  product({
    code: 'BW-TUR-00V',
    name: 'Turmeric Root Extract',
    strength: '500 mg extract standardised to 95 % curcuminoids',
    capsuleSize: '00',
    shellMaterial: 'hpmc',
    regulatoryClass: 'supplement',
    targetFillMg: 500,
    tappedDensityGPerMl: 0.6,
    shelfLifeMonths: 24,
  }),
  product({
    code: 'BW-PRB-0V',
    name: 'Probiotic Blend',
    strength: '10 billion CFU at manufacture, with maltodextrin',
    capsuleSize: '0',
    shellMaterial: 'hpmc',
    regulatoryClass: 'supplement',
    targetFillMg: 350,
    tappedDensityGPerMl: 0.58,
    shelfLifeMonths: 18,
  }),
  product({
    code: 'BW-ASH-0',
    name: 'Ashwagandha Root Powder',
    strength: '450 mg root powder',
    capsuleSize: '0',
    shellMaterial: 'gelatin',
    regulatoryClass: 'supplement',
    targetFillMg: 450,
    tappedDensityGPerMl: 0.72,
    shelfLifeMonths: 24,
  }),
  product({
    code: 'BW-ASC-0',
    name: 'Vitamin C (Ascorbic Acid)',
    strength: '500 mg ascorbic acid',
    capsuleSize: '0',
    shellMaterial: 'gelatin',
    regulatoryClass: 'supplement',
    targetFillMg: 560,
    tappedDensityGPerMl: 0.85,
    shelfLifeMonths: 24,
  }),
  product({
    code: 'BW-ELD-1',
    name: 'Elderberry Fruit Extract',
    strength: '300 mg fruit extract (10:1)',
    capsuleSize: '1',
    shellMaterial: 'gelatin',
    regulatoryClass: 'supplement',
    targetFillMg: 300,
    tappedDensityGPerMl: 0.7,
    shelfLifeMonths: 24,
  }),
  product({
    code: 'BW-NTX-1',
    name: 'Naltrexone Hydrochloride Capsules (compounded)',
    strength: '4.5 mg naltrexone hydrochloride in microcrystalline cellulose',
    capsuleSize: '1',
    shellMaterial: 'gelatin',
    regulatoryClass: 'drug',
    targetFillMg: 280,
    tappedDensityGPerMl: 0.62,
    limitPercent: 5,
    shelfLifeMonths: 6,
  }),
];

/** How often each product is scheduled, relative to the others. */
const productWeights: Record<string, number> = {
  'BW-MGG-00': 5,
  'BW-TUR-00V': 4,
  'BW-PRB-0V': 3,
  'BW-ASH-0': 3,
  'BW-ASC-0': 3,
  'BW-ELD-1': 3,
  'BW-NTX-1': 1,
};

const machines: MachineSeed[] = [
  { assetTag: 'BW-FIL-01', name: 'Filler 1', room: 'Filling Room A', model: 'Orrisfield CF-200', capsuleSizes: ['00', '0'] },
  { assetTag: 'BW-FIL-02', name: 'Filler 2', room: 'Filling Room A', model: 'Orrisfield CF-260', capsuleSizes: ['00', '0', '1'] },
  { assetTag: 'BW-FIL-03', name: 'Filler 3', room: 'Filling Room B', model: 'Velmont SemiCap 24', capsuleSizes: ['0', '1'] },
  { assetTag: 'BW-FIL-04', name: 'Filler 4', room: 'Filling Room B', model: 'Velmont SemiCap 24', capsuleSizes: ['00', '1'] },
];

function ring(serial: string, machineAssetTag: string, capsuleSize: CapsuleSize, extra: Partial<RingSeed> = {}): RingSeed {
  return {
    serial,
    machineAssetTag,
    capsuleSize,
    condition: 'good',
    status: 'in_service',
    statusReason: null,
    retiredAt: null,
    retirement: null,
    ...extra,
  };
}

const rings: RingSeed[] = [
  ring('BWR-0101', 'BW-FIL-01', '00'),
  ring('BWR-0102', 'BW-FIL-01', '00'),
  ring('BWR-0103', 'BW-FIL-01', '0'),
  ring('BWR-0104', 'BW-FIL-01', '0', {
    condition: 'damaged',
    status: 'retired',
    statusReason: 'Hairline crack in the body plate found at changeover inspection; replaced by BWR-0103.',
    retiredAt: '2026-08-14T15:30:00.000Z',
    retirement: {
      quarantined: {
        at: '2026-08-04T12:40:00.000Z',
        by: 'operator@brackwater.example',
        reason: 'Broken bodies in segment 7 on every revolution; ring taken off Filler 1 for inspection.',
      },
      retiredBy: 'approver@brackwater.example',
    },
  }),
  ring('BWR-0201', 'BW-FIL-02', '00', { condition: 'worn' }),
  ring('BWR-0202', 'BW-FIL-02', '0'),
  ring('BWR-0203', 'BW-FIL-02', '1'),
  ring('BWR-0301', 'BW-FIL-03', '0'),
  ring('BWR-0302', 'BW-FIL-03', '1', { condition: 'dented' }),
  ring('BWR-0303', 'BW-FIL-03', '1'),
  ring('BWR-0401', 'BW-FIL-04', '00', { condition: 'worn' }),
  ring('BWR-0402', 'BW-FIL-04', '1'),
];

const dayMs = 86_400_000;

function isoDate(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

function dateMs(iso: string): number {
  return Date.parse(`${iso}T00:00:00.000Z`);
}

function addMonths(iso: string, months: number): string {
  const d = new Date(dateMs(iso));
  d.setUTCMonth(d.getUTCMonth() + months);
  return isoDate(d.getTime());
}

function weightedProduct(rand: Prng): ProductSeed {
  const total = products.reduce((sum, p) => sum + (productWeights[p.code] ?? 1), 0);
  let r = rand() * total;
  for (const p of products) {
    r -= productWeights[p.code] ?? 1;
    if (r < 0) return p;
  }
  return products[products.length - 1]!;
}

function ringsAvailable(machine: MachineSeed, size: CapsuleSize, day: string): RingSeed[] {
  return rings.filter(
    (r) =>
      r.machineAssetTag === machine.assetTag &&
      r.capsuleSize === size &&
      (r.retiredAt === null || day < r.retiredAt.slice(0, 10)),
  );
}

function buildBatches(rand: Prng): BatchSeed[] {
  const batches: BatchSeed[] = [];
  for (let ms = dateMs(scenarioStart); ms <= dateMs(scenarioEnd); ms += dayMs) {
    const weekday = new Date(ms).getUTCDay();
    if (weekday === 0 || weekday === 6) continue;
    const day = isoDate(ms);
    const r = rand();
    const count = r < 0.15 ? 0 : r < 0.65 ? 1 : 2;
    const busy = new Set<string>();
    for (let i = 0; i < count; i++) {
      const p = weightedProduct(rand);
      const fits = machines.filter((m) => m.capsuleSizes.includes(p.capsuleSize));
      const free = fits.filter((m) => !busy.has(m.assetTag));
      const machine = pick(rand, free.length > 0 ? free : fits);
      busy.add(machine.assetTag);
      const r2 = pick(rand, ringsAvailable(machine, p.capsuleSize, day));
      batches.push({
        lotNumber: `BW-${day.slice(0, 4)}-${day.slice(5, 7)}${day.slice(8, 10)}-${'AB'[i]}`,
        productCode: p.code,
        machineAssetTag: machine.assetTag,
        ringSerial: r2.serial,
        // A compounded drug is made in smaller lots than the supplements.
        sizeCapsules: randomInt(rand, 10, p.regulatoryClass === 'drug' ? 20 : 60) * 5_000,
        unitsShipped: 0,
        status: 'released',
        manufacturedOn: day,
        expiresOn: addMonths(day, p.shelfLifeMonths),
      });
    }
  }
  assignStatuses(batches, rand);
  return batches;
}

/**
 * Most batches are released and (partly) shipped. The last days are still in process; one batch run
 * on the dented ring and one recent batch are on hold; one batch in September was rejected.
 */
function assignStatuses(batches: BatchSeed[], rand: Prng): void {
  const firstFrom = (day: string, extra: (b: BatchSeed) => boolean = () => true) =>
    batches.find((b) => b.manufacturedOn >= day && b.status === 'released' && extra(b));

  for (const b of batches) {
    if (b.manufacturedOn >= '2026-11-19') b.status = 'in_process';
  }
  const rejected = firstFrom('2026-09-16');
  if (rejected) rejected.status = 'rejected';
  const heldOnDentedRing = firstFrom('2026-10-20', (b) => b.ringSerial === 'BWR-0302');
  if (heldOnDentedRing) heldOnDentedRing.status = 'on_hold';
  const heldRecent = firstFrom('2026-11-10');
  if (heldRecent) heldRecent.status = 'on_hold';

  const recent = dateMs(scenarioEnd) - 30 * dayMs;
  for (const b of batches) {
    if (b.status !== 'released') continue;
    const share = dateMs(b.manufacturedOn) < recent ? 0.85 + rand() * 0.15 : 0.3 + rand() * 0.5;
    b.unitsShipped = Math.round((b.sizeCapsules * share) / 1_000) * 1_000;
  }
}

export function buildDemoScenario(): DemoScenario {
  const rand = mulberry32(scenarioSeed);
  return {
    company: { name: companyName, domain: companyDomain },
    settings: [
      { key: 'site_name', value: companyName },
      { key: 'approval_link_days', value: '7' },
    ],
    users: demoUsers.map((u) => ({ ...u })),
    products: products.map((p) => ({ ...p })),
    machines: machines.map((m) => ({ ...m, capsuleSizes: [...m.capsuleSizes] })),
    rings: rings.map((r) => ({ ...r, retirement: r.retirement && { ...r.retirement, quarantined: { ...r.retirement.quarantined } } })),
    batches: buildBatches(rand),
    defects: defectCatalogue.map((d) => ({ ...d })),
  };
}
