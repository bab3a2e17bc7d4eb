import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoPassword } from '@/scripts/seed/demo-users';
import { launchBrowser, screenshot, signIn, signOut } from '../helpers/e2e';
import { readMessages, waitForMessage } from '../helpers/mail';

/*
 * The write path end to end in a browser: an operator quarantines a filling ring, QA is told by
 * e-mail, and the QA approver retires it with an electronic signature. Checks what Part 11 asks a
 * signed record to show: printed name, date and time, and meaning (21 CFR 11.50(a)); a wrong
 * password signs nothing (11.200(a)); each step is in the record's history and audit trail (11.10(e)).
 * Ring BWR-0303 (filler BW-FIL-03, in service in the demo) is used only by this file.
 */

const serial = 'BWR-0303';
let context: BrowserContext;
let page: Page;

beforeAll(async () => {
  context = await launchBrowser();
  page = await context.newPage();
});

afterAll(async () => {
  await context.close();
});

async function openRing(): Promise<void> {
  await page.goto('/equipment');
  await page.getByRole('link', { name: serial }).first().click();
  await page.getByRole('heading', { name: `Filling ring ${serial}` }).waitFor();
}

describe('filling ring quarantined on the floor and retired by QA with a signature', () => {
  it('lets the operator quarantine the ring, asking for a reason first', async () => {
    await signIn(page, 'operator@brackwater.example', demoPassword);
    await openRing();
    const form = page.getByRole('region', { name: 'Quarantine this ring' });
    const mailBefore = readMessages().length;

    await form.getByRole('button', { name: 'Quarantine ring' }).click();
    await form.getByText(/Give the reason for this change/).first().waitFor();
    expect(await form.locator('textarea[aria-invalid="true"]').count()).toBe(1);

    await form.getByLabel(/Reason/).fill('Dent on two body bores found at the 10:00 ring check.');
    await form.getByRole('button', { name: 'Quarantine ring' }).click();
    await page.getByText('Quarantined', { exact: true }).first().waitFor();
    await screenshot(page, 'ring-quarantined-by-operator');

    // The operator may not retire a ring: no such action is offered, and QA is notified by mail.
    expect(await page.getByRole('region', { name: 'Retire this ring' }).count()).toBe(0);
    const mail = await waitForMessage(
      (m) => m.to.includes('approver@brackwater.example') && m.subject.includes(serial),
      { afterCount: mailBefore },
    );
    expect(mail.text).toContain('Dent on two body bores');
    await signOut(page);
  });

  it('refuses a wrong signature password and keeps the reason typed', async () => {
    await signIn(page, 'approver@brackwater.example', demoPassword);
    await openRing();
    const form = page.getByRole('region', { name: 'Retire this ring' });
    expect(await form.getByText('Electronic signature', { exact: false }).count()).toBeGreaterThan(0);
    await form.getByLabel(/Reason/).fill('Bores out of round; not repairable.');
    await form.getByLabel('Password').fill('not-my-password');
    await form.getByRole('button', { name: 'Sign and retire ring' }).click();
    await form.getByText(/password is not correct/i).first().waitFor();
    expect(await form.getByLabel(/Reason/).inputValue()).toBe('Bores out of round; not repairable.');
    expect(await page.getByText('No signatures yet.').count()).toBe(1);
  });

  it('retires the ring with the approver’s signature: name, meaning and time shown, matching the record', async () => {
    const form = page.getByRole('region', { name: 'Retire this ring' });
    await form.getByLabel('Password').fill(demoPassword);
    await form.getByRole('button', { name: 'Sign and retire ring' }).click();
    const signatures = page.getByRole('region', { name: 'Signatures' });
    await signatures.getByText(/by Henrike Mbeki-Strand/).waitFor();
    const text = await signatures.innerText();
    expect(text).toMatch(/Approved/i);
    expect(text).toMatch(/\d{4}-\d{2}-\d{2} \d{2}:\d{2}/);
    expect(text).toContain('Matches the record');
    const history = await page.getByRole('region', { name: 'History' }).innerText();
    expect(history).toMatch(/Retire/);
    expect(history).toMatch(/Quarantine/);
    expect(await page.getByRole('region', { name: 'What you can do' }).innerText()).not.toMatch(/Return to service/);
    await screenshot(page, 'ring-retired-with-signature');
  });
});
