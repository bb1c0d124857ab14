import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCase } from '../factories/cases';
import { recordDirectProtein } from '../factories/measurements';
import { accountId, createCaseAwaitingReview, currentDefinitions, ratesFor, WORKUP_PROTEIN_MG_PER_ML } from '../factories/workup';
import { countRows, makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
let tech: Awaited<ReturnType<TestApp['signedIn']>>;
let director: Awaited<ReturnType<TestApp['signedIn']>>;
beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
  director = await t.signedIn('director');
});
afterAll(() => t.close());

async function caseWithProtein() {
  const c = await createCase(tech);
  const p = await recordDirectProtein(tech, c.specimens[0]!, WORKUP_PROTEIN_MG_PER_ML, 'BCA assay (invented)');
  expect(p.status).toBe(200);
  return { c, specimenId: c.specimens[0]!.id };
}

describe('the small traps of a tired day', () => {
  it('when the same measurement is sent twice at once (a double click), then exactly one is saved and the other is a 409 that says what to do', async () => {
    const { c, specimenId } = await caseWithProtein();
    const cs = (await currentDefinitions(tech)).find((d) => d.code === 'CS')!;
    const body = ratesFor(cs, 150, specimenId, 1);
    const before = await countRows(t.sequelize, 'measurements');
    const [a, b] = await Promise.all([tech.post(`/api/cases/${c.id}/measurements`).send(body), tech.post(`/api/cases/${c.id}/measurements`).send(body)]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    expect(await countRows(t.sequelize, 'measurements')).toBe(before + 1);
    const clash = a.status === 409 ? a : b;
    expect(clash.body.error.fields.replicate).toBeDefined();
    expect(clash.body.error.message).toContain('save this one as replicate 2, the next free number');
    expect(clash.body.error.message).not.toContain('change that one');
  });

  it('when replicates 1 and 2 are saved and 1 is sent again, then the message offers replicate 3', async () => {
    const { c, specimenId } = await caseWithProtein();
    const ci = (await currentDefinitions(tech)).find((d) => d.code === 'CI')!;
    for (const r of [1, 2]) expect((await tech.post(`/api/cases/${c.id}/measurements`).send(ratesFor(ci, 30, specimenId, r))).status).toBe(201);
    const again = await tech.post(`/api/cases/${c.id}/measurements`).send(ratesFor(ci, 31, specimenId, 1));
    expect(again.status).toBe(409);
    expect(again.body.error.message).toContain('replicate 3');
  });

  it('when a draft interpretation is shorter than signing allows, then 400 names interpretation and no draft is stored', async () => {
    const admin = await t.signedIn('admin');
    const clinicianId = await accountId(admin, 'clinician@demo.test');
    const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const drafts = await countRows(t.sequelize, 'interpretation_drafts');
    const short = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'Short', version: null });
    expect(short.status).toBe(400);
    expect(short.body.error.fields.interpretation).toMatch(/at least 10 characters/);
    expect(await countRows(t.sequelize, 'interpretation_drafts')).toBe(drafts);
    const enough = await director.put(`/api/review/${c.id}/draft`).send({ interpretation: 'Ten chars.', version: null });
    expect(enough.status).toBe(200);
  });
});

describe('the age-partition table explains its counts', () => {
  it('when a band is previewed, then the note gives each group’s count before and after its own outlier screen and says why they need not add up', async () => {
    const list = (await director.get('/api/reference-intervals/controls')).body as { items: { id: number; filename: string }[] };
    const demo = list.items.find((u) => u.filename.includes('DEMO'))!;
    const selection = { specimenType: 'skeletal_muscle', assay: 'CI', measure: 'activity', ageBand: { label: 'Children', minYears: 0, maxYears: 16 }, outliers: 'tukey', method: 'mean2sd' };
    const res = await director.post(`/api/reference-intervals/controls/${demo.id}/preview`).send(selection);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const { partition, partitionNote, values } = res.body as { partition: { groups: { label: string; n: number }[] }; partitionNote: string; values: number[] };
    const [band, rest] = partition.groups;
    // The band's group before its screen holds exactly the values of the band (the preview's own list of them).
    expect(partitionNote).toContain(`${band!.label}: ${band!.n} of ${values.length}`);
    expect(partitionNote).toContain(`${rest!.label}: ${rest!.n} of `);
    expect(partitionNote).toMatch(/need not match the values the interval itself uses/);
  });
});
