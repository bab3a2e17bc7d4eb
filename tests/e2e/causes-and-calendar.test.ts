import type { BrowserContext, Page } from 'playwright-core';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { demoPassword } from '@/scripts/seed/demo-users';
import { launchBrowser, screenshot, signIn } from '../helpers/e2e';

/*
 * Two reference pages: the probable causes of a capsule defect on the six cause-and-effect
 * branches, and the site calendar with the US federal holidays as observed and the site's own
 * closures. Holiday dates are worked out here from 5 U.S.C. 6103, not from the app's calendar code.
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

const dayMs = 86_400_000;
const weekdays = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];
const iso = (d: Date) => d.toISOString().slice(0, 10);
const utc = (y: number, month: number, day: number) => new Date(Date.UTC(y, month - 1, day));
const longDate = (d: Date) =>
  `${weekdays[d.getUTCDay()]} ${d.getUTCDate()} ${d.toLocaleString('en-US', { month: 'long', timeZone: 'UTC' })} ${d.getUTCFullYear()}`;

/** 5 U.S.C. 6103(b), Executive Order 11582: a holiday on a Saturday is observed the Friday before, on a Sunday the Monday after. */
function observed(d: Date): Date {
  const wd = d.getUTCDay();
  return wd === 6 ? new Date(d.getTime() - dayMs) : wd === 0 ? new Date(d.getTime() + dayMs) : d;
}

/** The next fixed-date holiday (month, day) observed on `today` or later. */
function nextFixedHoliday(month: number, day: number, today: Date): { date: Date; observed: Date } {
  for (let y = today.getUTCFullYear(); ; y++) {
    const date = utc(y, month, day);
    if (observed(date).getTime() >= today.getTime()) return { date, observed: observed(date) };
  }
}

describe('probable causes of a capsule defect', () => {
  it('shows cracked or split shell on the six branches, with the vacuum causes and the power-isolation caution', async () => {
    await signIn(page, 'investigator@brackwater.example', demoPassword);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Equipment' }).click();
    await page.getByRole('link', { name: 'Probable causes of defects' }).click();
    await page.getByRole('heading', { name: 'Probable causes', level: 1 }).waitFor();

    const defect = page.getByLabel('Defect', { exact: true });
    await defect.selectOption({ label: 'Cracked or split shell (Major)' });
    await page.getByRole('button', { name: 'Show causes' }).click();
    await page.getByRole('heading', { name: /^Cracked or split shell/, level: 2 }).waitFor();
    expect(new URL(page.url()).searchParams.get('defect')).toBe('cracked_shell');

    // The six branches of the cause-and-effect (Ishikawa) diagram, "6M" (ICH Q9(R1) Annex I.1 lists
    // the diagram among the basic risk management tools; the branch names are common practice).
    const branches = await page.getByRole('heading', { level: 3 }).allInnerTexts();
    expect(branches.map((b) => b.replace(/\s*\(.*$/s, '').trim())).toEqual([
      'Method',
      'Machine',
      'Material',
      'Measurement',
      'People',
      'Environment',
    ]);

    // Common practice on semi-automatic fillers: too much vacuum cracks bodies; the gauge is checked too.
    const machine = await page.getByRole('region', { name: /^Machine/ }).innerText();
    expect(machine).toMatch(/Vacuum too high: bodies are pulled down hard, crack or break/);
    expect(machine).toMatch(/normally set in the 9–12 inHg range/);
    const measurement = await page.getByRole('region', { name: /^Measurement/ }).innerText();
    expect(measurement).toMatch(/Vacuum gauge out of calibration or misread/);

    // 29 CFR 1910.147 (control of hazardous energy): rings, pins and the dosing shoe are adjusted only
    // with the power isolated and locked out.
    const cautions = await page.getByText('Caution', { exact: true }).locator('..').allInnerTexts();
    expect(cautions.join('\n')).toMatch(/only with power isolated \(locked out\)/);
    // A major defect: no quarantine caution in front of the causes.
    expect(cautions.join('\n')).not.toMatch(/quarantine/i);
    await screenshot(page, 'causes-cracked-or-split-shell');
  });

  it('puts the quarantine and interlock cautions first for a critical defect whose causes include an interlock stop', async () => {
    await signIn(page, 'investigator@brackwater.example', demoPassword);
    await page.goto('/equipment/causes');
    await page.getByLabel('Defect', { exact: true }).selectOption({ label: 'Empty capsule (Critical)' });
    await page.getByRole('button', { name: 'Show causes' }).click();
    await page.getByRole('heading', { name: /^Empty capsule/, level: 2 }).waitFor();

    const cautions = await page.getByText('Caution', { exact: true }).locator('..').allInnerTexts();
    // Common practice: a critical defect secures the product before the investigation starts.
    expect(cautions[0]).toMatch(/quarantine the batch in process/);
    // 29 CFR 1910.212(a)(1) and ISO 14119: guards and interlocks are never bypassed.
    expect(cautions.join('\n')).toMatch(/Never defeat, bridge or tape over an interlock/);
    expect(await page.getByRole('region', { name: /^Machine/ }).innerText()).toMatch(/an interlock tripped/);
    await screenshot(page, 'causes-empty-capsule');
  });
});

describe('site calendar', () => {
  /** Opens the page and returns the day it is at the site, as the page states it (the site's time zone). */
  async function openCalendar(): Promise<Date> {
    await signIn(page, 'admin@brackwater.example', demoPassword);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Admin' }).click();
    await page.getByRole('link', { name: /Site calendar/ }).click();
    await page.getByRole('heading', { name: 'Site calendar', level: 1 }).waitFor();
    const stated = /Today at the site \(.+?\) is (\d{4}-\d{2}-\d{2})/.exec(await page.locator('main').innerText());
    expect(stated).not.toBeNull();
    return new Date(`${stated![1]}T00:00:00Z`);
  }

  /** The table lists about a year ahead, so a holiday may appear twice; the observed day tells them apart. */
  const holidayRow = (name: string, observedOn: Date) =>
    page
      .getByRole('table', { name: /Upcoming US federal holidays/ })
      .getByRole('row')
      .filter({ has: page.getByRole('rowheader', { name }) })
      .filter({ hasText: longDate(observedOn) });

  it('lists the fixed-date federal holidays on the day they are observed', async () => {
    const today = await openCalendar();
    // 5 U.S.C. 6103(a): the holidays on a fixed date. 6103(b) and Executive Order 11582: one on a
    // Saturday is observed the Friday before, on a Sunday the Monday after. E.g. Christmas Day 2026
    // is a Friday (observed that day), Independence Day 2027 a Sunday (observed Monday 5 July 2027).
    const fixedDate = [
      { name: 'New Year’s Day', month: 1, day: 1 },
      { name: 'Juneteenth National Independence Day', month: 6, day: 19 },
      { name: 'Independence Day', month: 7, day: 4 },
      { name: 'Veterans Day', month: 11, day: 11 },
      { name: 'Christmas Day', month: 12, day: 25 },
    ];
    for (const h of fixedDate) {
      const next = nextFixedHoliday(h.month, h.day, today);
      const row = await holidayRow(h.name, next.observed).innerText();
      expect(row).toContain(
        iso(next.observed) === iso(next.date) ? 'Same day' : `${longDate(next.date)}: a weekend, so observed on the nearest weekday`,
      );
    }
    if (iso(today) <= '2026-12-25') {
      expect(await holidayRow('Christmas Day', utc(2026, 12, 25)).innerText()).toMatch(/Friday 25 December 2026\s+Same day/);
    }
    await screenshot(page, 'calendar-federal-holidays');
  });

  it('adds a site closure with its description and refuses one on a federal holiday, at the field', async () => {
    const today = await openCalendar();
    const closures = page.getByRole('region', { name: 'Site closures' });

    /*
     * A weekday in the coming March, which has no federal holiday (5 U.S.C. 6103(a)); within the
     * next 400 days, the period the page lists closures for. Used only by this test, on a database
     * that is fresh each run.
     */
    let day = utc(today.getUTCMonth() < 2 ? today.getUTCFullYear() : today.getUTCFullYear() + 1, 3, 15);
    while (day.getUTCDay() === 0 || day.getUTCDay() === 6) day = new Date(day.getTime() + dayMs);
    const description = 'Plant shutdown: HVAC requalification of filling room 2';

    await closures.getByLabel('Day', { exact: true }).fill(iso(day));
    await closures.getByLabel('Description').fill(description);
    await closures.getByRole('button', { name: 'Add closure' }).click();
    await closures.getByText(`${longDate(day)} is now a site closure.`).waitFor();
    const row = await closures.getByRole('row').filter({ hasText: longDate(day) }).innerText();
    expect(row).toContain(description);
    // 21 CFR 11.10(e): who made the change is kept with it.
    expect(row).toContain('Added by Callum Aurelio-Ferris');
    expect(row).toContain('Site closed');
    await screenshot(page, 'calendar-closure-added');

    // 5 U.S.C. 6103: the observed federal holiday is already not a business day; a closure is refused
    // with the reason under the day field (common practice for form errors; WCAG 2.2 SC 3.3.1).
    const christmas = nextFixedHoliday(12, 25, today).observed;
    const dayField = closures.getByLabel('Day', { exact: true });
    await dayField.fill(iso(christmas));
    await closures.getByLabel('Description').fill('Extra day off');
    await closures.getByRole('button', { name: 'Add closure' }).click();
    await expect.poll(() => dayField.getAttribute('aria-invalid')).toBe('true');
    const errorIds = ((await dayField.getAttribute('aria-describedby')) ?? '').split(' ').filter((id) => id.endsWith('-error'));
    expect(errorIds).toHaveLength(1);
    const fieldError = await page.locator(`#${errorIds[0]}`).innerText();
    expect(fieldError).toContain(`${iso(christmas)} is already not a business day`);
    expect(fieldError).toContain('Christmas Day');
    // What was typed stays, so the administrator corrects only the day.
    expect(await closures.getByLabel('Description').inputValue()).toBe('Extra day off');
    expect(await closures.getByRole('row').filter({ hasText: longDate(christmas) }).count()).toBe(0);
    await screenshot(page, 'calendar-closure-refused-on-holiday');
  });
});
