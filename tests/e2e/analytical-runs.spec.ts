import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { defaultAssayDefinitions } from '@/schemas/assay';
import { makePlateFile } from '../factories/plate-file';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

const app = useAppInBrowser();

/*
 * One plate for two cases and two control levels, citrate synthase only. Slopes are written from chosen
 * activities with the activity formula of docs/domain.md §1 [derived]:
 *   |ΔA/min| = activity × ε × l × V_sample × protein / (V_reaction × 1000)
 * at the upload screen's defaults (200 µL in 0.32 cm² → l = 0.625 cm; 200 µL reaction, 10 µL sample) and the
 * CS extinction coefficient of the shipped definitions. Background wells carry a tenth of the total's slope, so
 * the specific slope is the chosen one. All materials, lots and values are invented.
 */
const CS = defaultAssayDefinitions.find((d) => d.code === 'CS')!;
const CONTROL_PROTEIN = 4;
const slopeFor = (activity: number, protein: number) => (activity * CS.epsilonPerMmPerCm * 0.625 * 10 * protein) / (200 * 1000);

type Well = { well: string; slope: number };
/** Total then background wells of one replicate: the total carries the specific slope plus the background. */
function pair(total: string, background: string, activity: number, protein: number): Well[] {
  const s = slopeFor(activity, protein);
  return [
    { well: total, slope: s * 1.1 },
    { well: background, slope: s * 0.1 },
  ];
}

function plateText(wells: Well[]): string {
  const slope = new Map(wells.map((w) => [w.well, w.slope]));
  return makePlateFile({ wells: [...slope.keys()], slopeFor: (w) => slope.get(w)!, interceptFor: () => 0.2, points: 14, intervalS: 15, decimals: 5 });
}

type OpenSpecimen = {
  specimenId: number;
  caseId: number;
  accession: string;
  label: string;
  proteinMgPerMl: number | null;
  saved: { assay: string; replicate: number }[];
};
/** The first CS replicate number the specimen has not saved yet (demo cases may already hold some). */
const freeReplicate = (s: OpenSpecimen) => Math.max(0, ...s.saved.filter((x) => x.assay === 'CS').map((x) => x.replicate)) + 1;
type Material = { id: number; name: string; lot: string; level: string };

async function api<T>(page: Page, method: 'get' | 'post' | 'put', path: string, data?: unknown): Promise<T> {
  const res = await page.request[method](`${app.server.origin}${path}`, { data, headers: { Origin: app.server.origin } });
  if (res.status() >= 300) throw new Error(`${method.toUpperCase()} ${path}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}

async function signInAs(page: Page, email: string): Promise<void> {
  await app.browser.clearCookies();
  await signIn(page, app.server.origin, email);
}

/** Two levels of an invented CS control with targets entered by one director and approved by the other. */
async function controlsWithTargets(page: Page): Promise<[Material, Material]> {
  await signInAs(page, 'director@demo.test');
  const made: Material[] = [];
  const targetIds: number[] = [];
  for (const [level, mean, sd] of [
    ['Level 1 (end-to-end)', 100, 8],
    ['Level 2 (end-to-end)', 250, 20],
  ] as const) {
    const m = await api<Material>(page, 'post', '/api/control-materials', {
      name: 'Fenwick pooled muscle homogenate',
      lot: 'E2E-0412',
      level,
      expiresOn: '2030-06-30',
      description: 'Invented control for the browser test',
    });
    const t = await api<{ id: number }>(page, 'post', `/api/control-materials/${m.id}/targets`, { assayCode: 'CS', mean, sd, note: 'Entered for the browser test' });
    made.push(m);
    targetIds.push(t.id);
  }
  await signInAs(page, 'director2@demo.test');
  for (const id of targetIds) await api(page, 'post', `/api/control-targets/${id}/approve`);
  return [made[0]!, made[1]!];
}

/** Two accepted specimens of different open cases; one without a protein gets an invented 3.2 mg/mL recorded. */
async function twoSpecimens(page: Page): Promise<[OpenSpecimen, OpenSpecimen]> {
  const { items } = await api<{ items: OpenSpecimen[] }>(page, 'get', '/api/runs/open-specimens');
  const withProtein = [...items].sort((a, b) => Number(b.proteinMgPerMl !== null) - Number(a.proteinMgPerMl !== null));
  const chosen: OpenSpecimen[] = [];
  for (const s of withProtein) {
    if (chosen.some((c) => c.caseId === s.caseId)) continue;
    chosen.push(s);
    if (chosen.length === 2) break;
  }
  expect(chosen.length, 'the demo data has two open cases').toBe(2);
  for (const s of chosen) {
    if (s.proteinMgPerMl !== null) continue;
    const detail = await api<{ specimens: { id: number; version: number }[] }>(page, 'get', `/api/cases/${s.caseId}`);
    const version = detail.specimens.find((x) => x.id === s.specimenId)!.version;
    await api(page, 'put', `/api/specimens/${s.specimenId}/protein`, { kind: 'direct', proteinMgPerMl: 3.2, proteinSource: 'BCA, end-to-end test (invented)', version });
    s.proteinMgPerMl = 3.2;
  }
  return [chosen[0]!, chosen[1]!];
}

async function place(page: Page, what: { specimen?: OpenSpecimen; material?: Material; wells: string; replicate?: number }) {
  if (what.specimen) {
    await page.getByRole('combobox', { name: 'Place' }).selectOption('specimen');
    await page.getByRole('textbox', { name: 'Find a specimen' }).fill(what.specimen.accession);
    await page.getByRole('combobox', { name: 'Specimen', exact: true }).selectOption(String(what.specimen.specimenId));
  } else {
    await page.getByRole('combobox', { name: 'Place' }).selectOption('control');
    await page.getByRole('combobox', { name: 'Control material' }).selectOption(String(what.material!.id));
  }
  await page.getByRole('combobox', { name: 'Assay' }).selectOption('CS');
  await page.getByRole('textbox', { name: 'Replicate' }).fill(String(what.replicate ?? 1));
  await page.getByRole('textbox', { name: 'Wells', exact: true }).fill(what.wells);
  await page.getByRole('combobox', { name: 'Pattern' }).selectOption('pairs-per-column');
  await page.getByRole('button', { name: 'Fill', exact: true }).click();
}

describe('analytical runs in Chromium', () => {
  let materials: [Material, Material];
  let specimens: [OpenSpecimen, OpenSpecimen];

  it('a technologist lays out two cases and two control levels, reads the file, moves a window, saves the run and opens it', async () => {
    const page = await app.browser.newPage();
    materials = await controlsWithTargets(page);
    await signInAs(page, 'technologist@demo.test');
    specimens = await twoSpecimens(page);
    const [s1, s2] = specimens;
    const [l1, l2] = materials;

    await page.getByRole('navigation').getByRole('link', { name: 'Runs' }).click();
    await page.waitForURL('**/runs');
    await page.getByRole('link', { name: 'New run' }).click();
    await page.waitForURL('**/runs/new');
    await page.getByRole('heading', { name: 'New run', level: 1 }).waitFor();
    expect(await page.title()).toMatch(/^New run · /);

    await page.getByRole('textbox', { name: 'Instrument' }).fill('Plate reader 2 (end-to-end bench)');
    // A1:A4 → case 1, replicates 1 and 2 as total/background pairs; B1:B4 → case 2; C1:C2 and D1:D2 the controls.
    await place(page, { specimen: s1, wells: 'A1:A4', replicate: freeReplicate(s1) });
    await place(page, { specimen: s2, wells: 'B1:B4', replicate: freeReplicate(s2) });
    await place(page, { material: l1, wells: 'C1:C2' });
    await place(page, { material: l2, wells: 'D1:D2' });
    await page.getByRole('combobox', { name: 'Place' }).selectOption('blank');
    await page.getByRole('button', { name: 'Well H12: empty' }).click();
    await expect(page.getByRole('button', { name: `Well A3: ${s1.accession} specimen ${s1.label} ` }).getAttribute('aria-label')).resolves.toMatch(
      new RegExp(` · CS · total · replicate ${freeReplicate(s1) + 1}$`),
    );
    await expect(page.getByRole('button', { name: /^Well D2: Fenwick .* · CS · background · replicate 1$/ }).count()).resolves.toBe(1);
    await expect(page.getByRole('button', { name: 'Well H12: plate blank (no sample)' }).count()).resolves.toBe(1);
    await expect(page.getByRole('list', { name: 'Problems in the layout' }).count()).resolves.toBe(0);
    await screenshot(page, 'runs-01-layout');

    const file = plateText([
      ...pair('A1', 'A2', 150, s1.proteinMgPerMl!),
      ...pair('A3', 'A4', 154, s1.proteinMgPerMl!),
      ...pair('B1', 'B2', 80, s2.proteinMgPerMl!),
      ...pair('B3', 'B4', 82, s2.proteinMgPerMl!),
      ...pair('C1', 'C2', 104, CONTROL_PROTEIN), // level 1: z = (104 − 100) / 8 = +0.5
      ...pair('D1', 'D2', 240, CONTROL_PROTEIN), // level 2: z = (240 − 250) / 20 = −0.5
      { well: 'H12', slope: 0 },
    ]);
    await page.getByLabel('Plate file (CSV or tab-separated text)').setInputFiles({ name: 'e2e-run-plate.csv', mimeType: 'text/csv', buffer: Buffer.from(file) });
    const proteins = page.getByLabel(/protein \(mg\/mL\)$/);
    await expect(proteins.count()).resolves.toBe(2);
    await proteins.nth(0).fill(String(CONTROL_PROTEIN));
    await proteins.nth(1).fill(String(CONTROL_PROTEIN));
    await expect(page.getByRole('button', { name: 'Save run' }).isDisabled()).resolves.toBe(true);
    await page.getByRole('button', { name: 'Read the file' }).click();

    const qc = page.getByTestId('run-qc-preview');
    await qc.waitFor();
    // z from the hand-worked values above [derived]; both within 1 SD, so no rule fires (Westgard 1981).
    await expect(qc.textContent()).resolves.toMatch(/Controls accepted/);
    await expect(qc.getByText('No rule fired.').count()).resolves.toBe(1);
    await expect(page.getByTestId('control-Level 1 (end-to-end)-CS').textContent()).resolves.toMatch(/\+0\.50/);
    await expect(page.getByTestId('control-Level 2 (end-to-end)-CS').textContent()).resolves.toMatch(/−0\.50/);
    expect(await page.locator('[data-testid^="run-group-"]').count()).toBe(6);
    await screenshot(page, 'runs-02-preview');

    // The window editing of the single-case import, here on case 1's first replicate.
    const groupId = `run-group-specimen:${s1.specimenId}|CS|${freeReplicate(s1)}`;
    const g = page.getByTestId(groupId);
    await g.getByLabel('From (s)').fill('30');
    await g.getByLabel('To (s)').fill('150');
    await g.getByRole('button', { name: 'Use this window' }).click();
    await page.getByTestId(groupId).getByText('30–150 s (set by hand)').waitFor();

    await page.getByRole('button', { name: 'Save run' }).click();
    const saved = page.getByTestId('run-saved');
    await saved.waitFor();
    await expect(saved.textContent()).resolves.toMatch(/4 measurements for 2 cases and 2 control results from e2e-run-plate\.csv\. Controls accepted/);
    await screenshot(page, 'runs-03-saved');

    await page.getByRole('link', { name: /^Open the run/ }).click();
    await page.waitForURL(/\/runs\/\d+$/);
    await page.getByTestId('run-qc').waitFor();
    await expect(page.getByTestId('run-qc').textContent()).resolves.toMatch(/Controls accepted/);
    await expect(page.getByRole('img', { name: /^Well C1: Fenwick pooled muscle homogenate · lot E2E-0412 · Level 1/ }).count()).resolves.toBe(1);
    for (const s of specimens) await expect(page.getByRole('link', { name: s.accession }).count()).resolves.toBe(2);
    await expect(page.getByRole('link', { name: 'e2e-run-plate.csv' }).count()).resolves.toBe(1);
    await expect(page.getByRole('form', { name: 'Release this run despite its controls' }).count()).resolves.toBe(0);
    await page.waitForLoadState('networkidle');
    await screenshot(page, 'runs-04-run-page');

    await page.goto(`${app.server.origin}/runs`);
    await page.getByRole('region', { name: 'Analytical runs' }).getByText('Plate reader 2 (end-to-end bench)').waitFor();
    await page.close();
  });

  it('a director releases a rejected run with a reason and the password typed again', async () => {
    const page = await app.browser.newPage();
    await signInAs(page, 'director@demo.test');
    const [l1, l2] = materials;
    const [s1] = specimens;
    // Level 1 at 140 against 100 ± 8 is z = +5: beyond 3 SD, so 1-3s rejects the run (Westgard 1981) [derived].
    const file = plateText([...pair('A1', 'A2', 150, s1.proteinMgPerMl!), ...pair('C1', 'C2', 140, CONTROL_PROTEIN), ...pair('D1', 'D2', 250, CONTROL_PROTEIN)]);
    const wells = [
      { use: 'specimen', well: 'A1', specimenId: s1.specimenId, assay: 'CS', role: 'total', replicate: freeReplicate(s1) + 2 },
      { use: 'specimen', well: 'A2', specimenId: s1.specimenId, assay: 'CS', role: 'background', replicate: freeReplicate(s1) + 2 },
      { use: 'control', well: 'C1', controlMaterialId: l1.id, assay: 'CS', role: 'total', replicate: 1 },
      { use: 'control', well: 'C2', controlMaterialId: l1.id, assay: 'CS', role: 'background', replicate: 1 },
      { use: 'control', well: 'D1', controlMaterialId: l2.id, assay: 'CS', role: 'total', replicate: 1 },
      { use: 'control', well: 'D2', controlMaterialId: l2.id, assay: 'CS', role: 'background', replicate: 1 },
    ];
    const plan = {
      instrument: 'Plate reader 2 (end-to-end bench)',
      startedAt: new Date().toISOString(),
      plateFormat: 96,
      wells,
      pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
      reactionVolumeUl: 200,
      sampleVolumeUl: 10,
      controlProteinMgPerMl: { [l1.id]: CONTROL_PROTEIN, [l2.id]: CONTROL_PROTEIN },
      windows: {},
    };
    const res = await page.request.post(`${app.server.origin}/api/runs`, {
      multipart: { plan: JSON.stringify(plan), file: { name: 'e2e-rejected-plate.csv', mimeType: 'text/csv', buffer: Buffer.from(file) } },
      headers: { Origin: app.server.origin },
    });
    expect(res.status(), await res.text()).toBe(201);
    const { run } = (await res.json()) as { run: { id: number; runNumber: string; qcStatus: string } };
    expect(run.qcStatus).toBe('reject');

    await page.goto(`${app.server.origin}/runs/${run.id}`);
    const qc = page.getByTestId('run-qc');
    await qc.waitFor();
    await expect(qc.textContent()).resolves.toMatch(/Controls rejected/);
    await expect(qc.getByRole('list', { name: 'Rules that fired' }).textContent()).resolves.toMatch(/One result beyond 3 SD \(1-3s\)/);
    await expect(page.getByTestId('control-Level 1 (end-to-end)-CS').textContent()).resolves.toMatch(/\+5\.00/);

    const form = page.getByRole('form', { name: 'Release this run despite its controls' });
    await expect(form.textContent()).resolves.toMatch(/printed in the\s+methods section .* kept in the audit trail/);
    // Too short a reason is refused on the spot and names the field.
    await form.getByLabel(/^Why the results can be released/).fill('ok');
    await form.getByRole('button', { name: 'Release the run with this reason' }).click();
    await form.getByText(/at least 10 characters/).waitFor();
    // A wrong password is refused by the server; nothing is released.
    await form.getByLabel(/^Why the results can be released/).fill('Level 1 vial thawed twice; a fresh vial read 103 on the same plate reader (corrective action logged).');
    await form.getByLabel('Your password, typed again').fill('not-the-password');
    await form.getByRole('button', { name: 'Release the run with this reason' }).click();
    await form.getByRole('alert').first().waitFor();
    const still = await api<{ override: unknown }>(page, 'get', `/api/runs/${run.id}`);
    expect(still.override).toBeNull();
    await screenshot(page, 'runs-05-release-form');

    await form.getByLabel('Your password, typed again').fill('cristae-demo');
    await form.getByRole('button', { name: 'Release the run with this reason' }).click();
    const released = page.getByTestId('run-override');
    await released.waitFor();
    await expect(released.textContent()).resolves.toMatch(/Released by Dr Ilse Marchetti .*Reason: Level 1 vial thawed twice/);
    await expect(page.getByRole('form', { name: 'Release this run despite its controls' }).count()).resolves.toBe(0);
    await page.waitForLoadState('networkidle');
    await screenshot(page, 'runs-06-released');

    await page.goto(`${app.server.origin}/runs?status=reject`);
    const row = page.getByRole('row').filter({ hasText: run.runNumber });
    await row.waitFor();
    await expect(row.textContent()).resolves.toMatch(/Controls rejected.*Released by a director/);
    await screenshot(page, 'runs-07-list');
    await page.close();
  });
});
