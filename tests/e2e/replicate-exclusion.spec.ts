import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { defaultAssayDefinitions } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { buildPatientInput, buildRegisterCaseInput } from '../factories/cases';
import { WORKUP_PROTEIN_MG_PER_ML, isolatedComplexI, ratesFor } from '../factories/workup';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const app = useAppInBrowser();

/*
 * A technologist excludes a wild replicate on the bench, with a reason, and sees it struck through there and on
 * the results, where the mean no longer counts it. The case is set up through the API (same session as the
 * page); rates are worked back from invented activities with the activity formula of docs/domain.md §1
 * [derived]. Complex I carries replicates 6, 6.6 and a wild 120 nmol/min/mg.
 */
const CI_REPS = [6, 6.6, 120];

async function api<T>(page: Page, method: 'GET' | 'POST' | 'PUT', path: string, data?: unknown): Promise<T> {
  const res = await page.request.fetch(`${app.server.origin}${path}`, { method, data, headers: { Origin: app.server.origin } });
  if (!res.ok()) throw new Error(`${method} ${path}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}

/** A case in assay with protein and every assay typed in; returns its id and the wild replicate's id. */
async function caseWithWildReplicate(page: Page): Promise<{ caseId: number; wildId: number }> {
  const clinicians = await api<{ items: { id: number }[] }>(page, 'GET', '/api/clinicians');
  const patient = await api<{ id: number }>(page, 'POST', '/api/patients', buildPatientInput({ labPatientId: 'E2E-EXCL-1', familyName: 'Wrenfield' }));
  const c = await api<{ id: number; specimens: { id: number; version: number }[] }>(
    page,
    'POST',
    '/api/cases',
    buildRegisterCaseInput(patient.id, clinicians.items[0]!.id),
  );
  const specimen = c.specimens[0]!;
  await api(page, 'PUT', `/api/specimens/${specimen.id}/protein`, {
    kind: 'direct',
    proteinMgPerMl: WORKUP_PROTEIN_MG_PER_ML,
    proteinSource: 'BCA on the plate reader (end-to-end test)',
    version: specimen.version,
  });
  let wildId = 0;
  for (const def of defaultAssayDefinitions) {
    const reps = def.code === 'CI' ? CI_REPS : [isolatedComplexI[def.code as AssayCode]];
    for (let i = 0; i < reps.length; i += 1) {
      const m = await api<{ id: number }>(page, 'POST', `/api/cases/${c.id}/measurements`, ratesFor(def, reps[i]!, specimen.id, i + 1));
      if (def.code === 'CI' && i === 2) wildId = m.id;
    }
  }
  return { caseId: c.id, wildId };
}

describe('excluding a replicate in Chromium', () => {
  it('excludes the wild complex I replicate with a reason on the bench; it is struck through there and on the results, and left out of the mean', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');
    const { caseId, wildId } = await caseWithWildReplicate(page);

    await page.goto(`${app.server.origin}/cases/${caseId}/assays`);
    const row = page.getByTestId(`measurement-${wildId}`);
    await row.waitFor();
    await screenshot(page, 'exclusion-01-bench-before');

    // No reason: the form says so and nothing is sent.
    await row.getByRole('button', { name: 'Exclude' }).click();
    const form = page.getByRole('form', { name: 'Exclude CI replicate 3' });
    await form.getByRole('button', { name: 'Exclude replicate' }).click();
    await form.getByText(/Give the reason for leaving this replicate out/).waitFor();

    await form.getByLabel('Why exclude CI replicate 3?').fill('Air bubble in the cuvette after 40 s');
    await form.getByRole('button', { name: 'Exclude replicate' }).click();
    await page.getByText('CI replicate 3 is excluded from the results: Air bubble in the cuvette after 40 s.').waitFor();
    await page.locator(`[data-testid="measurement-${wildId}"][data-excluded="true"]`).waitFor();
    await expect(row.getByTestId('exclusion-note').textContent()).resolves.toMatch(/^Excluded by Tamsin Oduya on .+: Air bubble in the cuvette after 40 s$/);
    const activityCell = row.locator('td').nth(4);
    await expect(activityCell.evaluate((el) => getComputedStyle(el).textDecorationLine)).resolves.toBe('line-through');
    await row.getByRole('button', { name: 'Include again' }).waitFor();
    await screenshot(page, 'exclusion-02-bench-struck-through');

    // The results: the value struck through, the reason beside it, n = 2.
    await page.goto(`${app.server.origin}/cases/${caseId}/results`);
    const ci = page.getByTestId('result-row-CI');
    await ci.waitFor();
    const struck = ci.getByTestId(`excluded-replicate-${wildId}`);
    await expect(struck.evaluate((el) => el.tagName)).resolves.toBe('S');
    await expect(struck.textContent()).resolves.toBe('120');
    const text = (await ci.textContent()) ?? '';
    expect(text).toMatch(/n 2 \(6 · 6\.6 · 120\)/);
    expect(text).toContain('Replicate 3 excluded by Tamsin Oduya: Air bubble in the cuvette after 40 s');
    // Mean of 6 and 6.6 [arithmetic] = 6.3: the complex I activity shown is the mean of the counted replicates.
    expect(Number(await ci.locator('td').first().locator('.num').first().textContent())).toBeCloseTo(6.3, 6);
    await expect(page.getByTestId('pattern-summary').textContent()).resolves.toMatch(/Isolated low complex I activity/);
    await page.waitForLoadState('networkidle');
    await screenshot(page, 'exclusion-03-results');

    // Back on the bench: complex I replicate 2 renumbered through the edit form, then the wild one counted again.
    await page.goto(`${app.server.origin}/cases/${caseId}/assays`);
    await row.waitFor();
    const second = page.locator('[data-testid^="measurement-"]').filter({ hasText: /^ACI2/ });
    await second.getByRole('button', { name: 'Edit' }).click();
    const edit = page.getByRole('form', { name: 'Change CI replicate 2' });
    await edit.getByLabel('Replicate').fill('3');
    await edit.getByRole('button', { name: 'Save changes' }).click();
    await expect(edit.getByRole('alert').first().textContent()).resolves.toMatch(/Replicate 3 of CI is already saved/);
    await edit.getByLabel('Replicate').fill('5');
    await screenshot(page, 'exclusion-04-edit-form');
    await edit.getByRole('button', { name: 'Save changes' }).click();
    await page.getByText(/CI replicate 5 saved: 6\.60? nmol\/min\/mg protein\./).waitFor();
    await row.getByRole('button', { name: 'Include again' }).click();
    await page.getByText('CI replicate 3 counts again.').waitFor();
    await expect(row.getAttribute('data-excluded')).resolves.toBeNull();
    await screenshot(page, 'exclusion-05-included-again');
    await page.close();
  });
});
