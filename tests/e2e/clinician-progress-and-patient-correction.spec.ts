import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { screenshot, signIn } from './support/browser';
import { useAppInBrowser } from './support/app';

/*
 * In Chromium against the real server with the demo data: a technologist corrects a patient's name from the case
 * page (and confirms a different person when the new name and birth date match another patient); the referring
 * clinician then sees that case under "Being worked on" on a phone-sized screen, in plain words and with no
 * results, and never a case another clinician referred.
 */

const app = useAppInBrowser();

type Summary = { id: number; accession: string; state: string; patientName: string; referringClinicianName: string | null };

async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL('**/sign-in**');
}

describe('patient correction and the clinician’s cases in progress, in Chromium', () => {
  let kase: Summary;
  let patientId = 0;

  it('a technologist corrects the patient’s family name from the case page', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'technologist@demo.test');
    const list = (await (await page.request.get(`${app.server.origin}/api/cases?state=received&pageSize=200`)).json()) as { items: Summary[] };
    kase = list.items.find((c) => c.referringClinicianName === 'Dr Rafael Quenby')!;
    expect(kase).toBeDefined();
    const detail = (await (await page.request.get(`${app.server.origin}/api/cases/${kase.id}`)).json()) as { patient: { id: number; familyName: string } };
    patientId = detail.patient.id;

    await page.goto(`${app.server.origin}/cases/${kase.id}`);
    await page.getByRole('link', { name: 'Correct patient details' }).click();
    await page.waitForURL(`**/patients/${patientId}/correct?case=${kase.id}`);
    const family = page.getByLabel('Family name');
    await expect(family.inputValue()).resolves.toBe(detail.patient.familyName);
    await family.fill('Corrigendum-Vale');
    await page.getByRole('button', { name: 'Save the correction' }).click();
    await page.getByText(/Patient details corrected/).waitFor({ timeout: 5000 }).catch(async (e: unknown) => {
      await screenshot(page, 'patient-correction-1-failed');
      throw e;
    });
    await screenshot(page, 'patient-correction-1-saved');

    await page.getByRole('link', { name: 'Back to the case' }).click();
    await page.waitForURL(`**/cases/${kase.id}`);
    await page.getByText(/Corrigendum-Vale,/).first().waitFor();
    await page.close();
  });

  it('registering someone with the same name and birth date as a patient asks: the same patient, or a different person with a reason', async () => {
    const page = await app.browser.newPage();
    const found = (await (await page.request.get(`${app.server.origin}/api/patients/search?q=Applebeck`)).json()) as {
      items: { id: number; familyName: string; givenName: string; dateOfBirth: string }[];
    };
    const twin = found.items.find((p) => p.id !== patientId)!;
    await page.goto(`${app.server.origin}/cases/new`);
    await page.getByRole('button', { name: /^Register a new patient/ }).click();
    const form = page.getByRole('form', { name: 'New patient' });
    await form.getByLabel('Lab patient ID').fill('E2E-TWIN-01');
    await form.getByLabel('Family name').fill(twin.familyName);
    await form.getByLabel('Given name(s)').fill(twin.givenName);
    await form.getByLabel('Date of birth').fill(twin.dateOfBirth);
    await form.getByRole('button', { name: 'Register the patient' }).click();
    const group = form.getByRole('group', { name: 'Already registered' });
    await group.getByRole('button', { name: 'Use this patient' }).waitFor();
    await group.getByRole('button', { name: 'This is a different person…' }).click();
    await group.getByLabel('How do you know this is a different person?').fill('Other family, different hospital number (demo)');
    await screenshot(page, 'register-patient-different-person');
    await group.getByRole('button', { name: 'Register as a different person' }).click();
    await form.waitFor({ state: 'detached' });
    const after = (await (await page.request.get(`${app.server.origin}/api/patients/search?q=E2E-TWIN-01`)).json()) as { items: { labPatientId: string }[] };
    expect(after.items.map((p) => p.labPatientId)).toEqual(['E2E-TWIN-01']);
    await page.close();
  });

  it('a correction that makes the name and birth date match another patient asks for a reason, then saves', async () => {
    const page = await app.browser.newPage();
    const other = (await (await page.request.get(`${app.server.origin}/api/patients/search?q=a`)).json()) as {
      items: { id: number; familyName: string; givenName: string; dateOfBirth: string }[];
    };
    const target = other.items.find((p) => p.id !== patientId)!;
    await page.goto(`${app.server.origin}/patients/${patientId}/correct`);
    await page.getByLabel('Family name').fill(target.familyName);
    await page.getByLabel('Given name(s)').fill(target.givenName);
    await page.getByLabel('Date of birth').fill(target.dateOfBirth);
    await page.getByRole('button', { name: 'Save the correction' }).click();
    const group = page.getByRole('group', { name: 'Already registered' });
    await group.getByText('A patient with this name and date of birth is already registered:').waitFor();
    await group.getByRole('button', { name: 'This is a different person…' }).click();
    // No reason: the shared schema refuses it in place.
    await group.getByRole('button', { name: 'Save: a different person' }).click();
    await group.getByText('Say how you know this is a different person').waitFor();
    await group.getByLabel('How do you know this is a different person?').fill('Different parents and hospital number (demo)');
    await screenshot(page, 'patient-correction-2-different-person');
    await group.getByRole('button', { name: 'Save: a different person' }).click();
    await page.getByText(/Patient details corrected/).waitFor();
    const audit = (await (await page.request.get(`${app.server.origin}/api/patients/${patientId}`)).json()) as { familyName: string };
    expect(audit.familyName).toBe(target.familyName);
    // Put the test name back for the clinician's view below.
    await page.getByLabel('Family name').fill('Corrigendum-Vale');
    await page.getByRole('button', { name: 'Save the correction' }).click();
    await page.getByText(/Patient details corrected/).waitFor();
    await signOut(page);
    await page.close();
  });

  it('the clinician sees the case under “Being worked on”, in plain words, on a phone-sized screen, with no results', async () => {
    const page = await app.browser.newPage();
    await signIn(page, app.server.origin, 'clinician2@demo.test');
    const theirs = (await (await page.request.get(`${app.server.origin}/api/reports/in-progress`)).json()) as { items: { accession: string }[] };
    await signOut(page);

    await page.setViewportSize({ width: 390, height: 844 });
    await signIn(page, app.server.origin, 'clinician@demo.test');
    await page.waitForURL('**/my-reports');
    const card = page.getByRole('listitem', { name: `Accession ${kase.accession}, in progress` });
    await card.waitFor();
    await expect(card.textContent()).resolves.toContain('Corrigendum-Vale');
    await expect(card.textContent()).resolves.toContain('Specimen received; testing has not started yet');
    const section = page.getByRole('region', { name: 'Being worked on' });
    const text = (await section.textContent()) ?? '';
    expect(text).not.toMatch(/nmol|% of|ratio|interval/i);
    for (const other of theirs.items) expect(text).not.toContain(other.accession);
    await screenshot(page, 'clinician-in-progress-phone');
    // No card is wider than the phone's screen.
    const widest = await page.evaluate(() =>
      Math.max(...[...document.querySelectorAll('[aria-label$=", in progress"]')].map((el) => el.getBoundingClientRect().right)),
    );
    expect(widest).toBeLessThanOrEqual(390);
    await page.close();
  });
});
