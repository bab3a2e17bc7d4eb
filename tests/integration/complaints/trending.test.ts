import { randomBytes, randomInt } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { db } from '@/db/client';
import { batches, complaints, products } from '@/db/schema';
import { ForbiddenError, ValidationError } from '@/lib/errors';
import { assertCanReadTrends, getComplaintTrends, getComplaintTrendsFor, getTrendToday } from '@/lib/complaints/trending';
import { type TestUser, makeUser } from '../support/fixtures';

/*
 * Complaint trends against MariaDB, on rows this file owns in a far-future year picked per run, which
 * no demo or other test data reaches, so the site-wide month and category counts are this run's alone. Rates per million
 * units shipped and their denominators are common practice (lib/complaints/trending-math.ts); the
 * month limit is the u-chart (Montgomery, Introduction to Statistical Quality Control — from memory).
 * Every expected number is worked by hand beside it.
 */

const tag = randomBytes(3).toString('hex').toUpperCase();
// A year of its own for each run, so a second run against the same database counts only its rows.
const Y = 2200 + randomInt(7000);
const P = Y - 1;
const site = { today: `${Y}-12-01`, timeZone: 'America/Chicago' };
const secretName = `Complainant ${tag} Quillfeather`;

let creator: TestUser;
let p1: number;
let p2: number;
const lot: Record<string, number> = {};
let complaintNo = 0;

async function makeProduct(code: string) {
  const [row] = await db
    .insert(products)
    .values({ code, name: `Trend product ${code}`, strength: '250 mg', capsuleSize: '1', shellMaterial: 'hpmc', regulatoryClass: 'supplement', targetFillMg: '250', fillLowerMg: '240', fillUpperMg: '260' })
    .$returningId();
  return row!.id;
}

async function makeLot(key: string, productId: number, manufacturedOn: string, unitsShipped: number) {
  const [row] = await db
    .insert(batches)
    .values({ lotNumber: `IT-TR-${tag}-${key}`, productId, sizeCapsules: Math.max(unitsShipped, 1000), unitsShipped, manufacturedOn, status: 'released' })
    .$returningId();
  lot[key] = row!.id;
}

async function makeComplaint(receivedOn: string, values: Partial<typeof complaints.$inferInsert>) {
  complaintNo += 1;
  await db.insert(complaints).values({
    number: `TR${tag}-${String(complaintNo).padStart(2, '0')}`,
    receivedOn,
    channel: 'phone',
    complainantKind: 'consumer',
    complainantName: secretName,
    complainantContact: `${tag.toLowerCase()}@caller.example`,
    description: 'Trend test complaint',
    createdBy: creator.id,
    ...values,
  });
}

beforeAll(async () => {
  creator = await makeUser('qa_investigator');
  p1 = await makeProduct(`IT-TR1-${tag}`);
  p2 = await makeProduct(`IT-TR2-${tag}`);
  await makeLot('A', p1, `${Y}-01-10`, 200_000);
  await makeLot('B', p1, `${Y}-02-05`, 300_000);
  await makeLot('C', p1, `${Y}-02-20`, 0);
  await makeLot('D', p2, `${Y}-01-15`, 500_000);
  await makeLot('E', p2, `${P}-11-02`, 100_000);
  await makeLot('F', p1, `${Y}-04-05`, 1_000_000);
  await makeLot('G', p1, `${Y}-05-05`, 1_000_000);
  await makeLot('H', p1, `${Y}-06-05`, 1_000_000);
  await makeLot('J', p2, `${Y}-07-03`, 400_000);

  await makeComplaint(`${Y}-01-20`, { productId: p1, batchId: lot.A, lotAsReported: `IT-TR-${tag}-A`, category: 'empty_capsule' });
  await makeComplaint(`${Y}-02-03`, { productId: p1, batchId: lot.A, category: 'empty_capsule', adverseEvent: false });
  // product left empty: the lot's product counts
  await makeComplaint(`${Y}-02-10`, { batchId: lot.B, category: 'packaging' });
  await makeComplaint(`${Y}-02-11`, { productId: p2, batchId: lot.D });
  await makeComplaint(`${Y}-02-15`, { productId: p1, batchId: lot.C, category: 'packaging' });
  await makeComplaint(`${Y}-03-01`, {
    productId: p1,
    lotAsReported: `XX-NOPE-${tag}`,
    lotUnknown: true,
    category: 'suspected_adverse_reaction',
    adverseEvent: true,
    seriousAdverseEvent: true,
    personHarmed: true,
    harmDescription: `Rash ${tag} after the second dose`,
  });
  await makeComplaint(`${Y}-03-02`, { productId: p2, category: 'taste_or_odour' });
  await makeComplaint(`${Y}-03-10`, { productId: p2, batchId: lot.E, category: 'packaging' });
  // before the range: counts for the lots' all-time totals only
  await makeComplaint(`${P}-12-15`, { productId: p1, batchId: lot.A, category: 'empty_capsule' });
  await makeComplaint(`${P}-10-01`, { productId: p2, batchId: lot.E, category: 'packaging' });
  // July: three complaints against 0.4 M units
  for (const day of [`${Y}-07-08`, `${Y}-07-09`, `${Y}-07-20`]) await makeComplaint(day, { productId: p2, category: 'light_fill' });
});

describe('complaint trends over January–March of the test year', () => {
  it('counts complaints per month against the units of lots made that month (common practice)', async () => {
    const t = await getComplaintTrends({ from: `${Y}-01`, to: `${Y}-03` }, site);
    expect(t.months.map((m) => [m.month, m.complaints, m.units, m.ratePerMillion])).toEqual([
      [`${Y}-01`, 1, 700_000, 1.43], // A 200 k + D 500 k; 1 / 0.7 M = 1.4286
      [`${Y}-02`, 4, 300_000, 13.33], // B 300 k + C 0; 4 / 0.3 M = 13.333
      [`${Y}-03`, 3, 0, null], // no lot made in March
    ]);
    expect(t.months[2]?.note).toMatch(/No units shipped on record/);
    // baseline Jul–Dec of the year before holds only E (November): fewer than three months with units
    expect(t.months[0]).toMatchObject({ upperLimit: null, signal: false });
    // 8 complaints over A+B+C+D = 1.0 M units → 8.00; E was made before the range
    expect(t.totals).toEqual({ complaints: 8, lotsMade: 4, units: 1_000_000, ratePerMillion: 8, signalMonths: 0 });
  });

  it('groups by category, with unassessed complaints shown and catalogue names for defects', async () => {
    const t = await getComplaintTrends({ from: `${Y}-01`, to: `${Y}-03` }, site);
    expect(t.categories.map((c) => [c.category, c.label, c.complaints, c.ratePerMillion])).toEqual([
      ['packaging', 'Packaging', 3, 3], // B, C, E over 1.0 M
      ['empty_capsule', 'Empty capsule', 2, 2],
      [null, 'Not yet assessed', 1, 1],
      ['suspected_adverse_reaction', 'Suspected adverse reaction', 1, 1],
      ['taste_or_odour', 'Taste or odour', 1, 1],
    ]);
    expect(t.categories.find((c) => c.category === 'suspected_adverse_reaction')).toMatchObject({ adverseEvents: 1, seriousAdverseEvents: 1 });
    expect(t.categories.reduce((s, c) => s + c.complaints, 0)).toBe(t.totals.complaints);
  });

  it('groups by product, taking the lot’s product when the complaint names only a lot', async () => {
    const t = await getComplaintTrends({ from: `${Y}-01`, to: `${Y}-03` }, site);
    const mine = t.products.filter((p) => p.productId === p1 || p.productId === p2);
    expect(mine.map((p) => [p.productId, p.complaints, p.lotsMade, p.units, p.ratePerMillion])).toEqual([
      [p1, 5, 3, 500_000, 10], // A, A, B (via lot), C, unmatched lot; A+B+C = 0.5 M → 10.00
      [p2, 3, 1, 500_000, 6], // D, no lot, E; only D made in range → 3 / 0.5 M = 6.00
    ]);
  });

  it('flags a lot with more than one complaint, counting complaints before the range too', async () => {
    const t = await getComplaintTrends({ from: `${Y}-01`, to: `${Y}-03` }, site);
    expect(t.lots.map((l) => [l.batchId, l.complaints, l.complaintsAllTime, l.repeat, l.ratePerMillion])).toEqual([
      [lot.A, 2, 3, true, 15], // 3 / 0.2 M = 15.00
      [lot.B, 1, 1, false, 3.33], // 1 / 0.3 M = 3.333
      [lot.C, 1, 1, false, null], // nothing shipped on record
      [lot.D, 1, 1, false, 2], // 1 / 0.5 M
      [lot.E, 1, 2, true, 20], // one in range, one in October of the year before: 2 / 0.1 M = 20.00
    ]);
    expect(t.lotsWithComplaints).toBe(5);
    expect(t.repeatLots).toBe(2);
    expect(t.lots[0]).toMatchObject({ lotNumber: `IT-TR-${tag}-A`, productCode: `IT-TR1-${tag}`, manufacturedOn: `${Y}-01-10`, unitsShipped: 200_000 });
  });

  it('counts complaints without a matching lot separately', async () => {
    const t = await getComplaintTrends({ from: `${Y}-01`, to: `${Y}-03` }, site);
    expect(t.unmatched).toEqual({ lotNotMatched: 1, noLotGiven: 1, reported: [{ lot: `XX-NOPE-${tag}`, complaints: 1 }] });
    // every complaint of the range is in the lot table or in the unmatched counts
    expect(t.lots.reduce((s, l) => s + l.complaints, 0) + t.unmatched.lotNotMatched + t.unmatched.noLotGiven).toBe(t.totals.complaints);
  });

  it('carries no personal data (21 CFR 211.198 records; personal data only for QA roles, issue rule)', async () => {
    const t = await getComplaintTrends({ from: `${P}-10`, to: `${Y}-07` }, site);
    const text = JSON.stringify(t);
    expect(text).not.toContain(secretName);
    expect(text).not.toContain(`${tag.toLowerCase()}@caller.example`);
    expect(text).not.toContain(`Rash ${tag}`);
  });
});

describe('month signal (u-chart, Montgomery — from memory)', () => {
  it('signals July above the limit of its six-month baseline', async () => {
    const t = await getComplaintTrends({ from: `${Y}-07`, to: `${Y}-07` }, site);
    // baseline Jan–Jun with units: Jan 1/0.7 M, Feb 4/0.3 M, Apr, May, Jun 0/1 M each → ū = 5 / 4.0 M = 1.25
    // July: 3 / 0.4 M = 7.50; UCL = 1.25 + 3·√(1.25 / 0.4) = 1.25 + 5.3033 = 6.5533 → 6.55
    expect(t.months).toEqual([
      expect.objectContaining({ month: `${Y}-07`, complaints: 3, units: 400_000, ratePerMillion: 7.5, baselineRate: 1.25, upperLimit: 6.55, signal: true }),
    ]);
    expect(t.totals.signalMonths).toBe(1);
  });
});

describe('range and access', () => {
  it('refuses a bad range with the parameter named (422)', async () => {
    const err = await getComplaintTrendsFor({ from: '2087-13' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors).toHaveProperty('from');
  });

  it('defaults to the twelve months ending in the site’s current month (site time zone)', async () => {
    // 03:00 UTC on 1 January 2087 is still 31 December 2086 in Chicago (UTC−6 in winter)
    const now = new Date('2087-01-01T03:00:00Z');
    expect(await getTrendToday(db, now)).toEqual({ today: '2086-12-31', timeZone: 'America/Chicago' });
    const t = await getComplaintTrendsFor({}, db, now);
    expect(t.range).toEqual({ from: '2086-01', to: '2086-12' });
    expect(t.months).toHaveLength(12);
  });

  it('lets QA, supervisors and administrators read trends; an operator, who reads only own complaints, cannot', async () => {
    for (const role of ['qa_investigator', 'qa_approver', 'supervisor', 'admin'] as const) {
      expect(() => assertCanReadTrends({ id: 1, role })).not.toThrow();
    }
    expect(() => assertCanReadTrends({ id: 1, role: 'operator' })).toThrow(ForbiddenError);
    expect(() => assertCanReadTrends({ id: 1, role: 'operator' })).toThrow(/only the complaints you entered/);
  });
});
