import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const ARTIFACTS = path.resolve(import.meta.dirname, '..', '..', '..', 'test-artifacts');

const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

/** Debian's Chromium, headless, as root and with no network beyond loopback. A missing browser fails the run. */
export async function launchBrowser(): Promise<BrowserContext> {
  if (!fs.existsSync(CHROMIUM)) {
    throw new Error(`Chromium not found at ${CHROMIUM}: install it with apt-get install -y chromium (.ci/run does)`);
  }
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-chromium-'));
  return chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1360, height: 900 },
    acceptDownloads: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export async function screenshot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  const file = path.join(ARTIFACTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

export async function signIn(page: Page, origin: string, email: string, password = 'cristae-demo'): Promise<void> {
  await page.goto(`${origin}/sign-in`);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
}
