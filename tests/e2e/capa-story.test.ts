import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { demoPassword } from '@/scripts/seed/demo-users';
import { launchBrowser, screenshot, signIn, signOut } from '../helpers/e2e';
import { readMessages, waitForMessage } from '../helpers/mail';

/*
 * The CAPA story in a browser, from a deviation to a closed CAPA, the last signature given from the
 * link in an e-mail. Sources beside the checks: 21 CFR 820.100(a) (CAPA: actions planned,
 * implemented, verified effective, recorded), ICH Q10 3.2.2 (effectiveness evaluated), 21 CFR 11.50
 * and 11.200(a) (a signature shows name and meaning and takes the password every time), 11.300
 * (a link is no credential: the reviewer signs in), and the OWASP guidance for one-time URL tokens
 * (single use; from memory).
 *
 * The CAPA is raised fresh each run from a closed demo deviation (POST /api/capa, the command the
 * investigation's "CAPA needed" also ends in; tests/e2e/deviation-story.test.ts covers that route),
 * so the test can run again on the same database. Everything after that is done on the screens.
 */

const owner = 'investigator@brackwater.example';
const approver = 'approver@brackwater.example';
const operator = 'operator@brackwater.example';
const ownerName = 'Idris Vantongeren';
const operatorName = 'Tova Lindqvist-Amaro';
const stamp = Date.now().toString(36).toUpperCase();
const ownerAction = `Add a filling-ring segment check to the start-up routine of every shift (e2e ${stamp}).`;
const operatorAction = `Inspect the ring segments and record them on the batch checklist before each batch (e2e ${stamp}).`;
const criteria = 'No deviations with the same defect on this filler over the next 20 batches.';
const ownerEvidence = 'Start-up routine SOP-FIL-014 rev 6 issued; all three shifts trained.';
const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);

let context: BrowserContext;
let page: Page;
let capaId = 0;
let capaNumber = '';
let reviewPath = '';

/* Generous waits: a busy machine or a dev server compiling a page on first visit is slow, not broken. */
async function patient(launched: Promise<BrowserContext>): Promise<BrowserContext> {
  const c = await launched;
  c.setDefaultTimeout(30_000);
  c.setDefaultNavigationTimeout(60_000);
  return c;
}

beforeAll(async () => {
  context = await patient(launchBrowser());
  page = await context.newPage();
});

afterAll(async () => {
  await context.close();
});

// Each step signs in afresh, so a step that failed half-way does not leave its person signed in.
beforeEach(async () => {
  await context.clearCookies();
});

const region = (p: Page, name: string) => p.getByRole('region', { name, exact: true });
const actionCard = (description: string) => region(page, 'Actions').getByRole('listitem').filter({ hasText: description });

async function openCapa(): Promise<void> {
  await page.goto(`/capa/${capaId}`);
  await page.getByRole('heading', { level: 1, name: new RegExp(`^${capaNumber}`) }).waitFor();
}

async function doneNote(text: RegExp): Promise<void> {
  await page.getByText(text).first().waitFor();
}

describe('a CAPA from a deviation, planned, approved, done, and found effective from an e-mailed link', () => {
  it('lets the QA investigator raise a CAPA from a deviation and write the plan with its criteria', async () => {
    await signIn(page, owner, demoPassword);
    const deviations = await page.request.get('/api/deviations?status=closed&pageSize=10');
    expect(deviations.status()).toBe(200);
    const deviation = ((await deviations.json()) as { rows: { id: number; title: string }[] }).rows[0];
    expect(deviation).toBeDefined();
    // The owner's own id, from a CAPA the demo gives them.
    const list = (await (await page.request.get('/api/capa?pageSize=100')).json()) as { rows: { id: number; owner: string }[] };
    const theirs = list.rows.find((r) => r.owner === ownerName);
    expect(theirs).toBeDefined();
    const ownerId = ((await (await page.request.get(`/api/capa/${theirs!.id}`)).json()) as { capa: { ownerId: number } }).capa.ownerId;

    const created = await page.request.post('/api/capa', {
      data: {
        title: `Stop the recurrence: ${deviation!.title}`.slice(0, 180) + ` (e2e ${stamp})`,
        sourceType: 'deviation',
        sourceId: deviation!.id,
        problemStatement: 'The defect of the deviation recurred on the same filler within a month.',
        rootCause: 'Worn ring segments are not checked before the first batch of a shift.',
        ownerId,
      },
    });
    expect(created.status()).toBe(201);
    const record = ((await created.json()) as { record: { id: number; number: string; status: string } }).record;
    expect(record.status).toBe('proposed');
    capaId = record.id;
    capaNumber = record.number;

    await openCapa();
    // 21 CFR 820.100(a)(3): the actions and how their effect will be verified are planned up front.
    await page.getByLabel('Effectiveness criteria').fill(criteria);
    await page.getByRole('button', { name: 'Save the plan' }).click();
    await doneNote(/The plan is saved/);

    for (const [description, person] of [
      [ownerAction, `${ownerName} (qa investigator)`],
      [operatorAction, `${operatorName} (operator)`],
    ] as const) {
      const add = page.locator('details', { has: page.locator('summary', { hasText: 'Add an action' }) });
      if (!(await add.evaluate((d) => (d as HTMLDetailsElement).open))) await add.locator('summary').click();
      await add.getByLabel('Corrective or preventive').selectOption({ label: 'Corrective' });
      await add.getByLabel('What it changes').selectOption({ label: 'Procedure' });
      await add.getByLabel('Description').fill(description);
      await add.getByLabel('Owner').selectOption({ label: person });
      await add.getByLabel('Due').fill(day(14));
      await add.getByRole('button', { name: 'Add the action' }).click();
      await actionCard(description).waitFor();
    }
    await page.getByText('0 of 2 completed.').waitFor();
    await screenshot(page, 'capa-story-01-plan-written');
    await signOut(page);
  });

  it('lets the QA approver sign the plan (21 CFR 11.50, 11.200(a))', async () => {
    await signIn(page, approver, demoPassword);
    await openCapa();
    const form = region(page, 'Approve the plan');
    await form.getByLabel('Password').fill(demoPassword);
    await form.getByRole('button', { name: 'Sign and approve' }).click();
    await doneNote(/The plan is approved/);
    await screenshot(page, 'capa-story-02-plan-approved');
    await signOut(page);
  });

  it('lets the owner start the work and each action owner record their action with its evidence (21 CFR 820.100(a)(7))', async () => {
    await signIn(page, owner, demoPassword);
    await openCapa();
    await region(page, 'Start the implementation').getByRole('button', { name: 'Start' }).click();
    await doneNote(/The implementation has started/);

    const mine = actionCard(ownerAction);
    await mine.getByLabel('Evidence of completion').fill(ownerEvidence);
    await mine.getByRole('button', { name: 'Record as completed' }).click();
    await doneNote(/The action is recorded as completed/);
    await signOut(page);

    await signIn(page, operator, demoPassword);
    await openCapa();
    const theirs = actionCard(operatorAction);
    await theirs.getByLabel('Evidence of completion').fill('Segments inspected before six batches; checklist entries signed.');
    await theirs.getByRole('button', { name: 'Record as completed' }).click();
    await doneNote(/The action is recorded as completed/);
    await page.getByText('2 of 2 completed.').waitFor();
    await screenshot(page, 'capa-story-03-actions-completed');
    await signOut(page);
  });

  it('opens the effectiveness check, and the approver receives a personal review link by e-mail', async () => {
    await signIn(page, owner, demoPassword);
    await openCapa();
    const mailBefore = readMessages().length;
    await region(page, 'Open the effectiveness check').getByRole('button', { name: 'Open the check' }).click();
    await doneNote(/The effectiveness check is open/);
    await screenshot(page, 'capa-story-04-check-open');
    await signOut(page);

    const mail = await waitForMessage((m) => m.to.includes(approver) && m.subject.includes(capaNumber), { afterCount: mailBefore, timeoutMs: 30_000 });
    expect(mail.subject).toMatch(/effectiveness check awaits your review/);
    expect(mail.text).toMatch(/asks for your password to sign and works once/);
    expect(mail.html).toContain('/review/');
    const link = /https?:\/\/\S+\/review\/[A-Za-z0-9_-]{43}/.exec(mail.text)?.[0];
    expect(link).toBeDefined();
    reviewPath = new URL(link!).pathname;
    // The owner is not asked to review their own CAPA (segregation of duties, common practice).
    expect(readMessages().slice(mailBefore).some((m) => m.to.includes(owner) && m.text.includes('/review/'))).toBe(false);
  });

  it('follows the link signed out, signs in as the reviewer and lands back on the review page', async () => {
    const fresh = await patient(launchBrowser());
    try {
      const reviewer = await fresh.newPage();
      await reviewer.goto(reviewPath);
      // 21 CFR 11.300: the link alone opens nothing; the reviewer identifies themselves first.
      await reviewer.waitForURL((url) => url.pathname === '/sign-in');
      expect(new URL(reviewer.url()).searchParams.get('callbackUrl')).toBe(reviewPath);
      await screenshot(reviewer, 'capa-story-05-link-asks-to-sign-in');
      await reviewer.getByLabel('E-mail').fill(approver);
      await reviewer.getByLabel('Password', { exact: true }).fill(demoPassword);
      await reviewer.getByRole('button', { name: 'Sign in' }).click();
      await reviewer.waitForURL((url) => url.pathname === reviewPath);
      await reviewer.getByRole('heading', { level: 1, name: `Effectiveness review: ${capaNumber}` }).waitFor();

      const body = await reviewer.locator('main').innerText();
      expect(body).toContain(ownerAction);
      expect(body).toContain(ownerEvidence);
      expect(body).toContain(`by ${operatorName}`);
      expect(body).toContain(criteria);
      await screenshot(reviewer, 'capa-story-06-review-page');

      // 21 CFR 11.50(a): the signer's name and the meaning are shown before the password.
      const effective = region(reviewer, 'Effective');
      expect(await effective.innerText()).toMatch(/Electronic signature: Effective/);
      expect(await effective.innerText()).toContain('Henrike Mbeki-Strand');
      await effective.getByLabel('Password').fill(demoPassword);
      await effective.getByRole('button', { name: 'Sign as effective' }).click();
      await reviewer.getByTestId('review-outcome').getByText(`Signed as effective. ${capaNumber} is closed.`).waitFor();
      await screenshot(reviewer, 'capa-story-07-signed-effective');

      await reviewer.getByRole('link', { name: `Open ${capaNumber}` }).click();
      await reviewer.getByRole('heading', { level: 1, name: new RegExp(`^${capaNumber}`) }).waitFor();
      expect(await reviewer.getByText('Closed, effective').count()).toBeGreaterThan(0);
      await screenshot(reviewer, 'capa-story-08-capa-closed');

      // Single use (OWASP one-time URL tokens, from memory): the same link now says it was used.
      await reviewer.goto(reviewPath);
      await reviewer.getByRole('heading', { level: 1, name: 'This link has already been used' }).waitFor();
      expect(await reviewer.getByRole('button', { name: /Sign as/ }).count()).toBe(0);
      await screenshot(reviewer, 'capa-story-09-link-already-used');
    } finally {
      await fresh.close();
    }
  });
});
