import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { CaseWorkup } from '@/schemas/measurement';
import { screenshot } from './support/browser';
import { useAppInBrowser } from './support/app';
import { demoCaseIn, pageAs } from './support/pages';

const app = useAppInBrowser();



async function workup(page: Page, caseId: number): Promise<CaseWorkup> {
  return (await (await page.request.get(`${app.server.origin}/api/cases/${caseId}/workup`)).json()) as CaseWorkup;
}

/** The lowest replicate of the assay not yet saved on the case's first measured specimen, from the API. */
async function freeReplicate(page: Page, caseId: number, assay: string, plus = 0): Promise<number> {
  const saved = (await workup(page, caseId)).measurements;
  const specimenId = saved[0]!.specimenId;
  let n = 1;
  while (saved.some((m) => m.specimenId === specimenId && m.assay === assay && m.replicate === n)) n += 1;
  return n + plus;
}

async function openBench(page: Page, caseId: number, tab: 'Type rates' | 'Paste readings') {
  await page.goto(`${app.server.origin}/cases/${caseId}/assays`);
  await page.getByRole('tab', { name: tab }).click();
}

describe('the bench', () => {
  it('when the assay changes, then the replicate number is the next one not yet saved for it', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    const c = await demoCaseIn(app, page, 'in_assay');
    const saved = (await workup(page, c.id)).measurements;
    const specimenId = saved[0]!.specimenId;
    const free = (assay: string) => {
      let n = 1;
      while (saved.some((m) => m.specimenId === specimenId && m.assay === assay && m.replicate === n)) n += 1;
      return String(n);
    };
    await openBench(page, c.id, 'Type rates');
    const panel = page.getByRole('tabpanel');
    for (const assay of ['CIII', 'CS', 'CI']) {
      await panel.getByLabel('Assay').selectOption(assay);
      expect(await panel.getByLabel('Replicate').inputValue()).toBe(free(assay));
    }
    await page.close();
  });

  it('when "Save measurement" is double-clicked, then one measurement is saved, the success is shown, no red error', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    const c = await demoCaseIn(app, page, 'in_assay');
    const before = (await workup(page, c.id)).measurements.length;
    const first = await freeReplicate(page, c.id, 'CIII');
    await openBench(page, c.id, 'Type rates');
    const panel = page.getByRole('tabpanel');
    await panel.getByLabel('Assay').selectOption('CIII');
    await panel.getByLabel('Total rate (ΔA/min)').fill('0.05');
    await panel.getByLabel('Background rate (ΔA/min)').fill('0.005');
    await panel.getByRole('button', { name: 'Save measurement' }).dblclick();
    const success = panel.getByRole('status').filter({ hasText: /^Saved CIII replicate/ });
    await success.waitFor();
    await page.waitForLoadState('networkidle');
    expect(await panel.getByRole('alert').count()).toBe(0);
    expect((await workup(page, c.id)).measurements.length).toBe(before + 1);
    // Focus moved to the message, and the next replicate is offered.
    expect(await page.evaluate(() => document.activeElement?.textContent ?? '')).toMatch(new RegExp(`^Saved CIII replicate ${first} `));
    expect(await panel.getByLabel('Replicate').inputValue()).toBe(String(await freeReplicate(page, c.id, 'CIII')));
    await screenshot(page, 'traps-double-click-save');
    await page.close();
  });

  it('when a save fails after a success, then the green message goes and focus lands on the red one', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    const c = await demoCaseIn(app, page, 'in_assay');
    await openBench(page, c.id, 'Type rates');
    const panel = page.getByRole('tabpanel');
    await panel.getByLabel('Assay').selectOption('CII+III');
    await panel.getByLabel('Total rate (ΔA/min)').fill('0.04');
    await panel.getByRole('button', { name: 'Save measurement' }).click();
    await panel.getByRole('status').filter({ hasText: /^Saved CII\+III/ }).waitFor();
    await page.waitForLoadState('networkidle');
    const next = await freeReplicate(page, c.id, 'CII+III');
    // The same replicate again: the server refuses it (the number is typed back by hand).
    await panel.getByLabel('Replicate').fill('1');
    await panel.getByLabel('Total rate (ΔA/min)').fill('0.04');
    await panel.getByRole('button', { name: 'Save measurement' }).click();
    const alert = panel.getByRole('alert').first();
    await alert.waitFor();
    expect(await alert.textContent()).toMatch(new RegExp(`Replicate 1 of CII\\+III is already saved .*replicate ${next}, the next free number`));
    expect(await panel.getByRole('status').filter({ hasText: /^Saved/ }).count()).toBe(0);
    expect(await page.evaluate(() => document.activeElement?.getAttribute('role'))).toBe('alert');
    await screenshot(page, 'traps-error-after-success');
    await page.close();
  });

  it('when pasted readings are not saved and the page is reloaded, then they are still there with a note', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    const c = await demoCaseIn(app, page, 'in_assay');
    await openBench(page, c.id, 'Paste readings');
    const readings = '0\t0.912\n15\t0.905\n30\t0.897\n45\t0.890';
    await page.getByRole('tabpanel').getByLabel('Total readings (time in s, absorbance)').fill(readings);
    await page.reload();
    await page.getByRole('tab', { name: 'Paste readings' }).click();
    const panel = page.getByRole('tabpanel');
    expect(await panel.getByLabel('Total readings (time in s, absorbance)').inputValue()).toBe(readings);
    expect(await panel.getByText(/pasted before the page was reloaded/).count()).toBe(1);
    await screenshot(page, 'traps-pasted-draft');
    await page.close();
  });
});

describe('accounts, tables and addresses', () => {
  it('when an administrator picks another role, then nothing changes until it is confirmed, and "Keep as it is" leaves it', async () => {
    const page = await pageAs(app, 'admin@demo.test');
    await page.goto(`${app.server.origin}/admin/accounts`);
    const role = page.getByLabel('Role of Tamsin Oduya');
    await role.selectOption('director');
    const confirm = page.getByRole('group', { name: 'Confirm the change for Tamsin Oduya' });
    await confirm.waitFor();
    await screenshot(page, 'traps-role-confirm');
    const users = async () =>
      ((await (await page.request.get(`${app.server.origin}/api/users`)).json()) as { items: { name: string; role: string; active: boolean }[] }).items;
    expect((await users()).find((u) => u.name === 'Tamsin Oduya')!.role).toBe('technologist');
    await confirm.getByRole('button', { name: 'Keep as it is' }).click();
    expect(await role.inputValue()).toBe('technologist');
    // Deactivation asks too.
    await page.getByRole('row', { name: /Tamsin Oduya/ }).getByRole('button', { name: 'Deactivate…' }).click();
    await confirm.getByText(/cannot sign in|can no longer sign in/).waitFor();
    expect((await users()).find((u) => u.name === 'Tamsin Oduya')!.active).toBe(true);
    await page.close();
  });

  it('when the technologist clicks a header cell beside its title, then the cases sort by that column', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    await page.goto(`${app.server.origin}/cases`);
    const header = page.getByRole('columnheader', { name: /Patient/ });
    await header.waitFor();
    const box = (await header.boundingBox())!;
    // Near the cell's right edge, away from the title text.
    await page.mouse.click(box.x + box.width - 4, box.y + box.height / 2);
    await page.waitForFunction(() => document.querySelector('th[aria-sort]')?.textContent?.includes('Patient'));
    expect(await header.getAttribute('aria-sort')).toMatch(/ascending|descending/);
    await page.close();
  });

  it('when an unknown address is opened, then a 404 page with its own title and a way back', async () => {
    const page = await pageAs(app, 'technologist@demo.test');
    await page.goto(`${app.server.origin}/no/such/page`);
    await page.getByRole('heading', { name: 'Nothing at this address' }).waitFor();
    expect(await page.title()).toBe('Page not found · Cristae');
    expect(await page.getByRole('link', { name: 'Back to your start page' }).count()).toBe(1);
    await page.close();
  });

  it('when a browser opens an API link its role may not see, then it reads a page, not JSON', async () => {
    const page = await pageAs(app, 'clinician@demo.test');
    await page.goto(`${app.server.origin}/api/cases`);
    expect(await page.getByRole('heading', { level: 1 }).textContent()).toBe('This is not part of your role');
    await screenshot(page, 'traps-api-link-page');
    await page.close();
  });
});
