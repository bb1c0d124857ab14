import { describe, expect, it } from 'vitest';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const app = useAppInBrowser();

// Each demo role lands on its own start page and sees only its own navigation.
const cases = [
  { email: 'technologist@demo.test', landing: '/cases', sees: ['Cases', 'Register a case', 'Rate check'], never: ['Accounts', 'Awaiting sign-out', 'Assay definitions'] },
  { email: 'director@demo.test', landing: '/review', sees: ['Awaiting sign-out', 'Assay definitions', 'Reference intervals'], never: ['Accounts', 'Reports for my patients'] },
  { email: 'clinician@demo.test', landing: '/my-reports', sees: ['Reports for my patients'], never: ['Cases', 'Accounts', 'Reference intervals'] },
  { email: 'admin@demo.test', landing: '/admin/accounts', sees: ['Accounts', 'Laboratory profile', 'Sent e-mail'], never: ['Cases', 'Awaiting sign-out'] },
];

describe('signing in, in Chromium', () => {
  it.each(cases)('when $email signs in, then they land on $landing and see only their role’s pages', async ({ email, landing, sees, never }) => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, email);
    await page.waitForURL(`**${landing}`);
    const nav = page.getByRole('navigation', { name: 'Main' });
    // The shell renders after the session loads: wait for each expected link before counting the others.
    for (const label of sees) await nav.getByRole('link', { name: label, exact: true }).waitFor();
    for (const label of never) await expect(nav.getByRole('link', { name: label, exact: true }).count()).resolves.toBe(0);
    await page.waitForLoadState('networkidle');
    await screenshot(page, `sign-in-${email.split('@')[0]}`);
    await page.close();
  });

  it('when a clinician opens an admin address directly, then they see the 403 page, not the admin page', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician@demo.test');
    await page.goto(`${app.server.origin}/admin/accounts`);
    await page.getByRole('heading', { name: 'This page is not part of your role' }).waitFor();
    await expect(page.getByRole('heading', { name: 'Accounts' }).count()).resolves.toBe(0);
    await page.close();
  });

  it('when the password is wrong, then the form says so and stays on the sign-in page', async () => {
    const page = await app.browser.newPage();
    await page.goto(`${app.server.origin}/sign-in`);
    await page.getByLabel('E-mail address').fill('director@demo.test');
    await page.getByLabel('Password').fill('wrong-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('alert').filter({ hasText: 'not correct' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await page.close();
  });
});
