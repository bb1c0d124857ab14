import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const app = useAppInBrowser();

const TEMPORARY = 'handed-over-at-desk-7';
const CHOSEN = 'my bench has a blue stool';

async function signOut(page: Page) {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL('**/sign-in');
}

describe("an administrator's reset and the person's own password, in Chromium", () => {
  it('when an admin sets a temporary password, then the technologist must choose their own before any page opens, and can change it again from the account menu', async () => {
    const page = await app.browser.newPage();

    // The administrator sets a temporary password from the Accounts page.
    await signIn(page, app.server.origin, 'admin@demo.test');
    await page.waitForURL('**/admin/accounts');
    const row = page.getByRole('row').filter({ hasText: 'technologist@demo.test' });
    await row.getByRole('button', { name: 'Reset password' }).click();
    await row.getByLabel(/Temporary password for/).fill(TEMPORARY);
    await row.getByRole('button', { name: 'Set' }).click();
    await page.getByRole('status').filter({ hasText: 'Temporary password set' }).waitFor();
    await row.getByText('Active, temporary password').waitFor();
    await screenshot(page, 'password-reset-by-admin');
    await signOut(page);

    // The technologist signs in with it: the change screen replaces every page, with no navigation.
    await signIn(page, app.server.origin, 'technologist@demo.test', TEMPORARY);
    await page.getByRole('heading', { name: 'Choose your own password' }).waitFor();
    await expect(page.getByRole('navigation', { name: 'Main' }).count()).resolves.toBe(0);
    await page.goto(`${app.server.origin}/cases`);
    await page.getByRole('heading', { name: 'Choose your own password' }).waitFor();
    await screenshot(page, 'password-change-required');

    // The shared schema answers beside the field before anything is sent.
    await page.getByLabel('Current password').fill(TEMPORARY);
    await page.getByLabel('New password').fill('too-short');
    await page.getByRole('button', { name: 'Save and continue' }).click();
    await page.getByRole('alert').filter({ hasText: 'Use at least 12 characters' }).waitFor();
    await screenshot(page, 'password-change-required-too-short');

    await page.getByLabel('New password').fill(CHOSEN);
    await page.getByRole('button', { name: 'Save and continue' }).click();
    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Cases', exact: true }).waitFor();
    await page.waitForLoadState('networkidle');
    await screenshot(page, 'password-change-required-done');

    // Later, from the account menu: a wrong current password is refused beside its field, the right one saves.
    await nav.getByRole('link', { name: 'Change password' }).click();
    await page.getByRole('heading', { name: 'Your password' }).waitFor();
    await page.getByLabel('Current password').fill('not-my-password');
    await page.getByLabel('New password').fill('a second good sentence');
    await page.getByRole('button', { name: 'Change password' }).click();
    await page.getByRole('alert').filter({ hasText: 'This is not your current password' }).waitFor();
    await screenshot(page, 'password-change-wrong-current');
    await page.getByLabel('Current password').fill(CHOSEN);
    await page.getByRole('button', { name: 'Change password' }).click();
    await page.getByRole('status').filter({ hasText: 'Your new password is saved' }).waitFor();
    await screenshot(page, 'password-change-done');
    await signOut(page);

    // Only the newest password signs in now.
    await page.getByLabel('E-mail address').fill('technologist@demo.test');
    await page.getByLabel('Password').fill(CHOSEN);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('alert').filter({ hasText: 'not correct' }).waitFor();
    await signIn(page, app.server.origin, 'technologist@demo.test', 'a second good sentence');
    await page.waitForURL('**/cases');
    await page.close();
  });
});
