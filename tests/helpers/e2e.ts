import { mkdirSync, mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { testStack } from './env';

/*
 * Browser tests drive Debian's Chromium through playwright-core against the built app that
 * `npm test` starts. Each launch gets a fresh profile, so no cookie or cache carries over.
 */

/** http://localhost:<port>: Auth.js builds its redirects from localhost, so 127.0.0.1 would lose the cookie. */
export const baseUrl = testStack.baseUrl;

export const chromiumPath = process.env.PLUMBLINE_CHROMIUM ?? '/usr/bin/chromium';

const chromiumFlags = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** A fresh browser profile; closing the context deletes it (and npm test empties the folder each run). */
export async function launchBrowser(): Promise<BrowserContext> {
  const parent = process.env.PLUMBLINE_BROWSER_PROFILES ?? os.tmpdir();
  mkdirSync(parent, { recursive: true });
  const profile = mkdtempSync(path.join(parent, 'plumbline-e2e-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath,
    headless: true,
    args: chromiumFlags,
    baseURL: baseUrl,
    viewport: { width: 1280, height: 860 },
    locale: 'en-GB',
    timezoneId: 'UTC',
  });
  context.setDefaultTimeout(15_000);
  // Chromium may still be writing the profile as the context reports closed; a leftover temp folder
  // is harmless, a failed test because of it is not.
  context.on('close', () => {
    void rm(profile, { recursive: true, force: true, maxRetries: 10, retryDelay: 200 }).catch(() => undefined);
  });
  return context;
}

/** Fills and submits the sign-in form without waiting for the outcome. */
export async function submitSignIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** Signs in through the sign-in page and waits until the app shows who is signed in. */
export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await submitSignIn(page, email, password);
  await page.getByTestId('current-user').waitFor();
}

export async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL((url) => url.pathname === '/sign-in');
}

const screenshotDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', 'e2e', 'screenshots');

/** Full-page PNG in tests/e2e/screenshots/ (git-ignored), for a person to look at after a run. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(screenshotDir, { recursive: true });
  const file = path.join(screenshotDir, `${name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '')}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
