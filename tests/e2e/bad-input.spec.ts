import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Sequelize } from 'sequelize';
import { describe, expect, it } from 'vitest';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'cristae-e2e-bad-input-'));
const app = useAppInBrowser({}, { dataDir });

describe('bad input, in Chromium', () => {
  it('when a director pastes values with decimal commas to verify an interval, then the line is named beside the values and no verdict is shown', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'director@demo.test');
    await page.goto(`${app.server.origin}/intervals/verify`);
    await page.getByLabel('Adopted lower limit').fill('30');
    await page.getByLabel('Adopted upper limit').fill('50');
    const invented = Array.from({ length: 20 }, (_, i) => `${37 + (i % 7)},${(i * 3) % 10}`).join('\n');
    await page.getByLabel('Local reference values').fill(invented);
    await page.getByRole('button', { name: 'Check the interval' }).click();
    await page.getByText('Line 1: "37,0" looks like a decimal comma; use a point (37.0)', { exact: false }).waitFor();
    await expect(page.getByText('Accept: the interval transfers').count()).resolves.toBe(0);
    await screenshot(page, 'bad-input-decimal-comma');
    await page.close();
  });

  it('when the stored lab time zone is misspelt, then the case list still loads, says so, and the admin sees the notice beside the field', async () => {
    // Written straight into the database, as an older version or a hand edit could have left it.
    const db = new Sequelize({ dialect: 'sqlite', storage: path.join(dataDir, 'cristae.sqlite'), logging: false });
    await db.query(`UPDATE lab_profiles SET timeZone = 'Europe/Londn'`);
    await db.close();

    const tech = await app.browser.newPage();
    await signIn(tech, app.server.origin, 'technologist@demo.test');
    await tech.goto(`${app.server.origin}/cases`);
    await tech.getByText(/"Europe\/Londn" is not a known IANA zone/).waitFor();
    await tech.getByRole('table').waitFor();
    await screenshot(tech, 'bad-input-zone-case-list');
    await tech.close();

    const admin = await app.browser.newPage();
    await signIn(admin, app.server.origin, 'admin@demo.test');
    await admin.goto(`${app.server.origin}/admin/laboratory`);
    await admin.getByText(/"Europe\/Londn" is not a known IANA zone/).waitFor();
    await admin.getByLabel('Time zone (IANA)').fill('Europe/Lndon');
    await admin.getByRole('button', { name: 'Save profile' }).click();
    await admin.getByText(/Not a known IANA time zone/).waitFor();
    await screenshot(admin, 'bad-input-zone-profile');
    await admin.getByLabel('Time zone (IANA)').fill('Europe/London');
    await admin.getByRole('button', { name: 'Save profile' }).click();
    await admin.getByText('Laboratory profile saved', { exact: false }).waitFor();
    await admin.close();
  });
});
