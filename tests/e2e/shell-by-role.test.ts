import type { BrowserContext, Page } from 'playwright-core';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { demoPassword, demoUsers, type DemoUser } from '@/scripts/seed/demo-users';
import { can, type Permission } from '@/lib/auth/permissions';
import { roleLabels } from '@/lib/auth/roles';
import { launchBrowser, screenshot, signIn, signOut, submitSignIn } from '../helpers/e2e';

/*
 * The signed-in shell for each role, in a real browser against the built app: who is signed in,
 * which sections the role is offered, and that signing out ends the session.
 */

/** The main sections and the permission that opens each; what a role sees follows the permission table. */
const sections: readonly { label: string; permission: Permission }[] = [
  { label: 'Deviations', permission: 'deviation.read' },
  { label: 'CAPA', permission: 'capa.read' },
  { label: 'Complaints', permission: 'complaint.read' },
  { label: 'Batches', permission: 'batch.read' },
  { label: 'Equipment', permission: 'equipment.read' },
  { label: 'Weight checks', permission: 'weight_check.read' },
  { label: 'Admin', permission: 'users.manage' },
];

/** One person per role: the first demo user listed with it. */
const onePerRole: DemoUser[] = demoUsers.filter((u, i) => demoUsers.findIndex((v) => v.role === u.role) === i);

let context: BrowserContext;
let page: Page;

beforeEach(async () => {
  context = await launchBrowser();
  page = await context.newPage();
});

afterEach(async () => {
  await context.close();
});

const mainNavLabels = async () =>
  (await page.getByRole('navigation', { name: 'Main' }).getByRole('link').allInnerTexts()).map((t) => t.trim());

describe('the app shell for each role', () => {
  it('covers every role in the permission table', () => {
    expect(new Set(onePerRole.map((u) => u.role))).toEqual(new Set(Object.keys(roleLabels)));
  });

  for (const user of onePerRole) {
    it(`shows ${roleLabels[user.role]} ${user.name} who they are and only their sections, and signs out`, async () => {
      await signIn(page, user.email, demoPassword);

      // Common practice, for attributability (PIC/S PI 041-1, ALCOA "attributable"): the screen
      // always shows who is acting, so nobody works under someone else's session unnoticed.
      const currentUser = page.getByTestId('current-user');
      await expect.poll(() => currentUser.innerText()).toContain(user.name);
      expect(await currentUser.innerText()).toContain(roleLabels[user.role]);

      // 21 CFR 11.10(d) and (g), EU GMP Annex 11 §12.1: access is limited to what the role is
      // authorised for. The navigation offers exactly the sections the role may read.
      const expected = sections.filter((s) => can({ id: 0, role: user.role }, s.permission)).map((s) => s.label);
      expect((await mainNavLabels()).sort()).toEqual([...expected].sort());

      await screenshot(page, `shell-${user.role}`);

      // OWASP ASVS 4.0.3 V3.3.1: signing out ends the session, so the back button or a bookmark
      // does not resume it.
      await signOut(page);
      expect(await page.getByTestId('current-user').count()).toBe(0);
      await page.goto('/deviations');
      await page.waitForURL((url) => url.pathname === '/sign-in');
      expect(new URL(page.url()).searchParams.get('callbackUrl')).toContain('/deviations');
    });
  }
});

describe('a failed sign-in', () => {
  // OWASP Authentication Cheat Sheet, "Authentication and Error Messages": one generic message,
  // whether the account does not exist or the password is wrong, so accounts cannot be probed.
  it('shows one generic message for a wrong password and for an unknown account, and stays signed out', async () => {
    const someone = demoUsers.find((u) => u.email.startsWith('operator2@')) ?? demoUsers[demoUsers.length - 1]!;
    const errorBox = page.locator('form').getByRole('alert');

    await submitSignIn(page, someone.email, `${demoPassword}-wrong`);
    await expect.poll(() => errorBox.count()).toBe(1);
    const wrongPassword = (await errorBox.innerText()).trim();

    await submitSignIn(page, 'nobody-by-this-name@brackwater.example', demoPassword);
    await expect.poll(() => errorBox.count()).toBe(1);
    const unknownAccount = (await errorBox.innerText()).trim();

    expect(wrongPassword.length).toBeGreaterThan(0);
    expect(unknownAccount).toBe(wrongPassword);
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    expect(await page.getByTestId('current-user').count()).toBe(0);
  });
});
