import type { BrowserContext, Page } from 'playwright-core';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { demoPassword } from '@/scripts/seed/demo-users';
import { launchBrowser, screenshot, signIn } from '../helpers/e2e';

/*
 * The re-inspection sampling calculator as someone on the floor uses it: lot size, inspection level,
 * severity and AQL in, the single sampling plan out. The expected plans are read from the published
 * tables (ISO 2859-1:1999 Table 1 and Table 2-A; the same plans as MIL-STD-105E Tables I and II-A and
 * ANSI/ASQ Z1.4-2003), not from the app's own table.
 */

let context: BrowserContext;
let page: Page;

beforeEach(async () => {
  context = await launchBrowser();
  page = await context.newPage();
  await signIn(page, 'operator@brackwater.example', demoPassword);
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Batches' }).click();
  await page.getByRole('link', { name: 'Re-inspection sampling plan' }).click();
  await page.getByRole('heading', { name: 'Re-inspection sampling plan', level: 1 }).waitFor();
});

afterEach(async () => {
  await context.close();
});

const planCard = (defectClass: 'Critical' | 'Major' | 'Minor') =>
  page.getByRole('article').filter({ has: page.getByRole('heading', { name: new RegExp(`^${defectClass} defects`) }) });

async function choose(lotSize: string, major: string): Promise<void> {
  const form = page.getByRole('form', { name: 'Lot and acceptance quality limits' });
  await form.getByLabel('Inspection level').selectOption('II');
  await form.getByLabel('Severity of inspection').selectOption('normal');
  await form.getByLabel('Major defects: AQL').selectOption(major);
  await form.getByLabel('Lot size (capsules)').fill(lotSize);
}

describe('re-inspection sampling plan', () => {
  it('gives code letter G, follows the arrow to H: inspect 50, Ac 1, Re 2 for a lot of 200 at AQL 1.0', async () => {
    await choose('200', '1.0');
    const major = planCard('Major');
    await major.getByText('Code letter', { exact: true }).waitFor();
    const text = await major.innerText();

    expect(text).toContain('AQL 1.0');
    expect(text).toContain('ISO 2859-1:1999 Table 2-A');
    // ISO 2859-1:1999 Table 1: a lot of 151–280 at general level II is code letter G (sample 32).
    // Table 2-A, G at AQL 1.0 is an arrow down; the first plan below is H: n = 50, Ac 1, Re 2
    // (MIL-STD-105E Table II-A gives the same).
    expect(text).toMatch(/Code letter\s+G → H \(arrow followed\)/);
    expect(text).toMatch(/Sample size\s+50\b/);
    expect(text).toMatch(/Ac \/ Re\s+1 \/ 2/);
    expect(text).toMatch(/Inspect 50 capsules; accept if ≤ 1 defects, reject if ≥ 2\./);
    // ISO 2859-1:1999 Table 2-A, key to the arrows: use the first plan below the arrow, with its own sample size.
    expect(text).toMatch(/The sample size is that plan's, not the 32 of code letter G\./);
    expect(text).not.toMatch(/whole lot/);

    // The plan is in the address, so it can be bookmarked or pasted into a record (common practice).
    const url = new URL(page.url());
    expect(url.searchParams.get('lotSize')).toBe('200');
    expect(url.searchParams.get('major')).toBe('1.0');
    await screenshot(page, 'sampling-lot-200-aql-1-0');
  });

  it('inspects every capsule of a lot of 5, and keeps critical defects at 100 % with the quarantine caution', async () => {
    await choose('5', '1.0');
    const major = planCard('Major');
    await major.getByText('Code letter', { exact: true }).waitFor();
    const text = await major.innerText();
    // ISO 2859-1:1999 Table 1: 2–8 at level II is letter A; Table 2-A at AQL 1.0 sends A down to the
    // first plan with Ac 0 (letter E, n = 13). 13 ≥ 5, so the whole lot is inspected (Table 2-A, key
    // to the arrows: if the sample size equals or exceeds the lot size, carry out 100 % inspection).
    expect(text).toMatch(/Code letter\s+A → E \(arrow followed\)/);
    expect(text).toMatch(/Inspect 5 capsules \(the whole lot\); accept if ≤ 0 defects, reject if ≥ 1\./);
    expect(text).toContain('inspect every unit in the lot (100 % inspection)');

    // Common practice for capsule lines (no AQL is set for critical defects by the standard): every
    // capsule inspected, none accepted.
    const critical = await planCard('Critical').innerText();
    expect(critical).toContain('Inspect all 5');
    expect(critical).toContain('Ac 0, Re 1');

    // Common practice (21 CFR 211.192 asks that such a discrepancy be investigated): a lot with a
    // critical defect is quarantined first; sampling never releases it.
    const caution = page.getByText('Critical defects are not sampled away', { exact: true }).locator('..');
    expect(await caution.innerText()).toMatch(/quarantined and the site procedure followed\. A sampling plan can never release such a lot\./);
    await screenshot(page, 'sampling-lot-5-whole-lot');
  });
});
