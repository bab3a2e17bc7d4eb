import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, describe, expect, it } from 'vitest';
import { demoPassword } from '@/scripts/seed/demo-users';
import { launchBrowser, screenshot, signIn } from '../helpers/e2e';
import { readMessages, waitForMessage } from '../helpers/mail';

/*
 * A complaint about empty capsules from the telephone to a signed answer, in a real browser, by the
 * people it passes through: an operator takes it down on a tablet for a caller (the date before the
 * lot was made is refused beside the field, with everything typed kept); a QA investigator assesses
 * it, signs the reportability decision (21 CFR 211.198(a), 11.50), investigates with the retained
 * samples and the batch's deviations beside it, links a deviation, raises a CAPA and signs the
 * investigation (211.198(b)(2)); writes the answer from the template and e-mails it (the letter is
 * kept with the record, 211.198(b)(3)); a QA approver closes it with a signature. Throughout, the
 * complainant's name and address stay with QA: neither the operator nor the supervisor gets them
 * from the page or the JSON API (data minimisation, GDPR Art. 5(1)(c); EU GMP Annex 11 §12.1).
 */

const people = {
  operator: 'operator@brackwater.example',
  supervisor: 'supervisor@brackwater.example',
  investigator: 'investigator@brackwater.example',
  approver: 'approver@brackwater.example',
};
const tablet = { width: 800, height: 1280 };
const stamp = Date.now().toString(36);
const complainant = { name: `Perpetua Wendlebury-${stamp}`, contact: `p.wendlebury.${stamp}@customers.example` };
const story: { id: number; number: string; lot: string; lotMadeOn: string; deviation: string } = { id: 0, number: '', lot: '', lotMadeOn: '', deviation: '' };
const contexts: BrowserContext[] = [];

async function personOnPage(email: string, viewport?: { width: number; height: number }): Promise<Page> {
  const context = await launchBrowser();
  contexts.push(context);
  const page = await context.newPage();
  if (viewport) await page.setViewportSize(viewport);
  await signIn(page, email, demoPassword);
  return page;
}

afterAll(async () => {
  await Promise.all(contexts.map((c) => c.close()));
});

async function openStory(page: Page): Promise<void> {
  await page.goto(`/complaints/${story.id}`, { timeout: 30_000 });
  await page.getByRole('heading', { level: 1, name: new RegExp(`^${story.number}:`) }).waitFor();
}

async function sign(page: Page, testId: string, password = demoPassword): Promise<void> {
  const form = page.getByTestId(testId);
  await form.getByLabel('Password').fill(password);
  await form.getByRole('button').click();
}

const noPersonalData = (json: string) => {
  expect(json).not.toContain(complainant.name);
  expect(json).not.toContain(complainant.contact);
};

describe('a complaint about empty capsules from intake to a signed answer', () => {
  let operator: Page;
  let qa: Page;

  it('finds a released lot and a reported deviation for the story', async () => {
    qa = await personOnPage(people.investigator);
    const batches = (await (await qa.request.get('/api/batches?status=released')).json()) as { rows: { lotNumber: string; manufacturedOn: string }[] };
    const lot = batches.rows[0];
    expect(lot, 'the demo has released batches').toBeDefined();
    story.lot = lot!.lotNumber;
    story.lotMadeOn = lot!.manufacturedOn;
    const deviations = (await (await qa.request.get('/api/deviations?status=investigation&status=closed&pageSize=10')).json()) as { rows: { number: string | null }[] };
    story.deviation = deviations.rows.find((d) => d.number)?.number ?? '';
    expect(story.deviation).not.toBe('');
  });

  it('lets an operator take it down on a tablet; a date before the lot was made is refused beside the field, nothing typed is lost', async () => {
    operator = await personOnPage(people.operator, tablet);
    await operator.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Complaints' }).click();
    await operator.getByRole('link', { name: 'Take down a complaint' }).click();
    await operator.getByRole('heading', { level: 1, name: 'Take down a complaint' }).waitFor({ timeout: 30_000 });
    const form = operator.getByTestId('complaint-intake');
    await form.getByLabel('Name').fill(complainant.name);
    await form.getByLabel('How to reach them').fill(complainant.contact);
    await form.getByLabel('Consumer').check();
    const dayBefore = new Date(Date.parse(`${story.lotMadeOn}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
    await form.getByLabel('Received on').fill(dayBefore);
    await form.getByLabel('Lot number as they read it').fill(story.lot);
    await form.getByLabel('In their words').fill('Opened a new bottle and found four capsules that were completely empty, no powder at all.');
    await form.getByLabel('Capsules affected').fill('4');
    await form.getByLabel('They are sending the capsules back').check();
    await screenshot(operator, 'complaint-story-01-intake-tablet');
    await form.getByRole('button', { name: 'Save the complaint' }).click();

    const refusal = form.locator('#field-receivedOn-error');
    await refusal.waitFor();
    expect(await refusal.innerText()).toContain(`was made on ${story.lotMadeOn}`);
    expect(await form.getByLabel('Name').inputValue()).toBe(complainant.name);
    expect(await form.getByLabel('In their words').inputValue()).toContain('four capsules');
    await screenshot(operator, 'complaint-story-02-date-refused');

    // Today at the site, the latest date the field accepts.
    await form.getByLabel('Received on').fill((await form.getByLabel('Received on').getAttribute('max'))!);
    await form.getByRole('button', { name: 'Save the complaint' }).click();
    await operator.waitForURL(/\/complaints\/\d+\?done=received/, { timeout: 30_000 });
    story.id = Number(/\/complaints\/(\d+)/.exec(operator.url())![1]);
    const heading = await operator.getByRole('heading', { level: 1 }).innerText();
    story.number = /^(CMP-\d{4}-\d{4,})/.exec(heading)![1]!;
    const intake = operator.getByTestId('intake-section');
    expect(await intake.innerText()).toContain('Visible to QA only');
    noPersonalData(await operator.content());
    await screenshot(operator, 'complaint-story-03-saved-operator-view');
  });

  it('keeps the complainant from the operator on every JSON route (GDPR Art. 5(1)(c), Annex 11 §12.1)', async () => {
    for (const path of [`/api/complaints/${story.id}`, '/api/complaints?pageSize=100', `/api/complaints/${story.id}/attachments`]) {
      // A development server may compile the route on this first call.
      const response = await operator.request.get(path, { timeout: 60_000 });
      expect(response.status(), path).toBe(200);
      noPersonalData(await response.text());
    }
    const detail = (await (await operator.request.get(`/api/complaints/${story.id}`)).json()) as { personal: unknown };
    expect(detail.personal).toBeNull();
    // The operator may not start the assessment (21 CFR 211.198(a): QA reviews complaints).
    const refused = await operator.request.post(`/api/complaints/${story.id}`, { data: { event: 'start_assessment', version: 1 }, timeout: 60_000 });
    expect(refused.status()).toBe(403);
  });

  it('lets the QA investigator assess it and sign the reportability decision (21 CFR 211.198(a), 11.50)', async () => {
    await openStory(qa);
    expect(await qa.getByTestId('intake-section').innerText()).toContain(complainant.name);
    await qa.getByTestId('event-start_assessment').getByRole('button', { name: 'Start the assessment' }).click();
    await qa.waitForURL(/done=start_assessment/);
    const form = qa.getByTestId('assessment-form');
    await form.getByLabel('Category').selectOption({ label: 'Empty capsule' });
    await form.getByRole('group', { name: 'Is it an adverse event?' }).getByLabel('No').check();
    await form.getByRole('group', { name: 'Must it be reported to FDA?' }).getByLabel('No').check();
    await form.getByLabel('Rationale').fill('Empty capsules are a quality defect: investigate. Nobody took an empty capsule as a dose and nobody was harmed; no report is due.');
    await screenshot(qa, 'complaint-story-04-assessment');
    await form.getByRole('button', { name: 'Save the assessment' }).click();
    await qa.waitForURL(/done=assessment/);
    await sign(qa, 'event-complete_assessment');
    await qa.waitForURL(/done=complete_assessment/);
    expect(await qa.getByTestId('assessment-section').innerText()).toContain('Decision signed');
  });

  it('lets the investigator investigate beside the batch’s deviations, link a deviation, raise a CAPA and sign (21 CFR 211.198(b)(2))', async () => {
    const section = qa.getByTestId('investigation-section');
    await section.getByTestId('batch-deviations').waitFor();
    const form = qa.getByTestId('investigation-form');
    await form.getByRole('group', { name: 'Retained samples of the lot checked?' }).getByLabel('Yes').check();
    await form.getByLabel('What the retained samples showed').fill('500 retained capsules weighed: 2 empty, both from the same dosing segment.');
    await form.getByLabel('Summary of the investigation').fill('A blocked dosing bore on the filler let empty bodies through; the check-weigher reject limit was too wide to catch them.');
    await form.getByRole('button', { name: 'Save the investigation' }).click();
    await qa.waitForURL(/done=investigation/);

    const link = qa.getByTestId('link-deviation');
    await link.getByLabel('Link an existing deviation').fill(story.deviation);
    await link.getByRole('button', { name: 'Link' }).click();
    await qa.waitForURL(/done=link_deviation/);

    await qa.getByText('Raise a CAPA from this complaint').click();
    const capa = qa.getByTestId('raise-capa');
    await capa.getByLabel('CAPA title').fill('Empty capsules reaching customers: dosing bore blockage');
    await capa.getByRole('button', { name: 'Raise the CAPA' }).click();
    await qa.waitForURL(/done=capa/);
    const links = await qa.getByTestId('complaint-links').innerText();
    expect(links).toContain(story.deviation);
    expect(links).toMatch(/CAPA-\d{4}-\d{4}/);
    await screenshot(qa, 'complaint-story-05-investigation-linked');

    await sign(qa, 'event-complete_investigation');
    await qa.waitForURL(/done=complete_investigation/);
  });

  it('writes the answer from the template and e-mails it; the letter is kept with the record (21 CFR 211.198(b)(3))', async () => {
    const letterForm = qa.getByTestId('letter-form');
    const editor = letterForm.getByRole('textbox');
    await editor.waitFor();
    expect(await editor.innerText()).toContain(story.number);
    // The template's bracketed notes must be replaced; sending is refused until they are.
    await editor.click();
    await qa.keyboard.press('ControlOrMeta+a');
    await qa.keyboard.type(
      `Dear ${complainant.name}, thank you for telling us about the empty capsules (reference ${story.number}). We found a blocked dosing bore on the filler, cleared it and tightened our weight check. Please return the bottle; we will replace it.`,
    );
    await letterForm.getByRole('button', { name: 'Save the letter' }).click();
    await qa.waitForURL(/done=letter/);
    const mailBefore = readMessages().length;
    const send = qa.getByTestId('send-form');
    await send.getByLabel(/By e-mail to/).check();
    await screenshot(qa, 'complaint-story-06-letter');
    await send.getByRole('button', { name: 'Send the answer' }).click();
    await qa.waitForURL(/done=sent_email/);
    expect(await qa.getByTestId('response-section').innerText()).toContain('blocked dosing bore');
    const mail = await waitForMessage((m) => m.to.includes(complainant.contact) && m.subject.includes(story.number), { afterCount: mailBefore, timeoutMs: 30_000 });
    expect(mail.text).toContain('blocked dosing bore');
  });

  it('lets a QA approver close it with a signature', async () => {
    const approver = await personOnPage(people.approver);
    await openStory(approver);
    await sign(approver, 'event-close');
    await approver.waitForURL(/done=close/);
    expect(await approver.getByTestId('complaint-header').innerText()).toContain('Closed');
    await approver.getByRole('heading', { name: 'Timeline' }).scrollIntoViewIfNeeded();
    await screenshot(approver, 'complaint-story-07-closed');
  });

  it('shows the supervisor the closed complaint without the complainant, on the page and the JSON API', async () => {
    const supervisor = await personOnPage(people.supervisor);
    await openStory(supervisor);
    expect(await supervisor.getByTestId('response-section').innerText()).toContain('visible to QA only');
    noPersonalData(await supervisor.content());
    noPersonalData(await (await supervisor.request.get(`/api/complaints/${story.id}`)).text());
    await supervisor.goto('/complaints');
    await supervisor.getByRole('link', { name: story.number }).waitFor();
    noPersonalData(await supervisor.content());
    await screenshot(supervisor, 'complaint-story-08-list-supervisor');
  });
});
