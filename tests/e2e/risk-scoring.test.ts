import type { BrowserContext, Page } from 'playwright-core';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { demoPassword } from '@/scripts/seed/demo-users';
import { launchBrowser, screenshot, signIn } from '../helpers/e2e';

/*
 * Risk scoring of a capsule defect by the QA investigator: the risk priority number, the action
 * priority from the AIAG & VDA FMEA Handbook (2019) table, and a classification that a low score
 * never lowers for a defect the catalogue calls critical. The operator is kept out by the server.
 */

let context: BrowserContext;
let page: Page;

beforeEach(async () => {
  context = await launchBrowser();
  page = await context.newPage();
});

afterEach(async () => {
  await context.close();
});

const result = () => page.getByRole('region', { name: /^Result/ });

async function score(dimension: 'Severity' | 'Occurrence' | 'Detection', value: number): Promise<void> {
  await page.getByRole('group', { name: new RegExp(`^${dimension} \\(`) }).locator(`input[type="radio"][value="${value}"]`).check();
}

describe('risk scoring of a capsule defect', () => {
  it('scores foreign matter S 9, O 1, D 10 as RPN 90 and action priority low, still critical with the quarantine caution; S 8, O 6, D 7 is high', async () => {
    await signIn(page, 'investigator@brackwater.example', demoPassword);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Deviations' }).click();
    await page.getByRole('link', { name: /^Risk scoring/ }).click();
    await page.getByRole('heading', { name: 'Risk scoring', level: 1 }).waitFor();

    const defect = page.getByLabel('Capsule defect');
    const foreignMatter = await defect.locator('option', { hasText: /^Foreign matter/ }).getAttribute('value');
    expect(foreignMatter).toBeTruthy();
    await defect.selectOption(foreignMatter!);
    // The catalogue (scripts/seed/defect-catalogue.ts) classes foreign matter critical, severity 9.
    expect(await page.getByRole('group', { name: /^Severity \(S\)/ }).locator('input[value="9"]').isChecked()).toBe(true);

    await score('Severity', 9);
    await score('Occurrence', 1);
    await score('Detection', 10);
    const box = result();
    await box.getByText('RPN 90', { exact: true }).waitFor();
    const text = await box.innerText();
    // IEC 60812:2018: RPN = S × O × D = 9 × 1 × 10.
    expect(text).toMatch(/RPN 90\s+of 1000/);
    // AIAG & VDA FMEA Handbook (2019), action priority table: S 9–10 with O 1 is low for every D.
    expect(text).toContain('Action priority: Low');
    expect(text).toContain('row S 9-10 · O 1 · D 7-10');
    // Common practice: a score never quietly lowers the class the defect catalogue gives; a low action
    // priority leaves foreign matter critical.
    expect(text).toMatch(/Classification\s+Critical/);
    // Common practice: a critical defect means the batch is quarantined before anything else.
    const caution = box.getByText('Quarantine first', { exact: true }).locator('..');
    expect(await caution.innerText()).toMatch(/stop the line and quarantine the batch in process/);
    expect(await caution.innerText()).toContain('Keep the affected capsules and any fragment as evidence.');
    await screenshot(page, 'risk-foreign-matter-s9-o1-d10');

    await score('Severity', 8);
    await score('Occurrence', 6);
    await score('Detection', 7);
    await box.getByText('RPN 336', { exact: true }).waitFor();
    const high = await box.innerText();
    // AIAG & VDA FMEA Handbook (2019), action priority table: S 7–8, O 6–7, D 7–10 is high.
    expect(high).toContain('Action priority: High');
    expect(high).toContain('row S 7-8 · O 6-7 · D 7-10');
    expect(high).toMatch(/Classification\s+Critical/);
    await screenshot(page, 'risk-foreign-matter-s8-o6-d7');
  });

  it('refuses the operator on the server: /deviations/risk answers 403 with the forbidden page', async () => {
    await signIn(page, 'operator@brackwater.example', demoPassword);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Deviations' }).click();
    await page.getByRole('heading', { name: 'Deviations', level: 1 }).waitFor();
    // 21 CFR 11.10(d), EU GMP Annex 11 §12.1: access limited to the roles authorised; not even offered.
    expect(await page.getByRole('link', { name: /^Risk scoring/ }).count()).toBe(0);

    // Typing the address is refused by the server itself, not only hidden in the navigation.
    const response = await page.goto('/deviations/risk');
    expect(response?.status()).toBe(403);
    await page.getByRole('heading', { name: 'Not available to your role', level: 1 }).waitFor();
    expect(await page.getByLabel('Capsule defect').count()).toBe(0);
    await screenshot(page, 'risk-operator-forbidden');
  });
});
