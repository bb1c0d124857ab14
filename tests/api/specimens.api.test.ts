import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { specimenLabel } from '../../server/modules/specimens/specimens.service';
import { buildSpecimenInput, createCase } from '../factories/cases';
import { cuvette, recordDirectProtein } from '../factories/measurements';
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

const HOUR = 3_600_000;
const hoursAgo = (h: number) => new Date(Date.now() - h * HOUR).toISOString();

describe('specimen labels', () => {
  it('when specimens are counted, then labels run A…Z and continue AA, AB like spreadsheet columns', () => {
    // Spreadsheet column lettering (bijective base 26) [common practice].
    expect([0, 1, 25, 26, 27, 51, 52, 701, 702].map(specimenLabel)).toEqual(['A', 'B', 'Z', 'AA', 'AB', 'AZ', 'BA', 'ZZ', 'AAA']);
  });
});

describe('POST /api/cases/:id/specimens', () => {
  it('when more specimens arrive, then they are labelled B and C, and the case list shows every type and the earliest receipt', async () => {
    const c = await createCase(tech, { specimen: buildSpecimenInput({ collectedAt: null, receivedAt: hoursAgo(5) }) });
    const b = await tech.post(`/api/cases/${c.id}/specimens`).send(buildSpecimenInput({ type: 'liver', collectedAt: null, receivedAt: hoursAgo(9) }));
    const d = await director.post(`/api/cases/${c.id}/specimens`).send(buildSpecimenInput({ type: 'fibroblasts', wetWeightMg: null }));
    expect([b.status, d.status]).toEqual([201, 201]);
    expect([b.body.label, d.body.label]).toEqual(['B', 'C']);
    const list = await tech.get(`/api/cases?q=${c.accession}`);
    expect(list.body.items[0].specimenTypes.sort()).toEqual(['fibroblasts', 'liver', 'skeletal_muscle']);
    expect(list.body.items[0].receivedAt).toBe(b.body.receivedAt);
    const [events] = await t.sequelize.query(`SELECT COUNT(*) AS n FROM audit_events WHERE "caseId" = ${c.id} AND entity = 'specimen' AND action = 'create'`);
    expect(events).toEqual([{ n: 3 }]);
  });

  it('when a specimen is rejected on receipt without a reason, then 400 names rejectionReason and nothing is written', async () => {
    const c = await createCase(tech);
    const before = [await countRows(t.sequelize, 'specimens'), await countRows(t.sequelize, 'audit_events')];
    const res = await tech.post(`/api/cases/${c.id}/specimens`).send({ ...buildSpecimenInput(), accepted: false, rejectionReason: '' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('rejectionReason');
    expect([await countRows(t.sequelize, 'specimens'), await countRows(t.sequelize, 'audit_events')]).toEqual(before);
  });

  it('when a specimen is rejected on receipt with a typed reason, then it is stored rejected with that reason', async () => {
    const c = await createCase(tech);
    const res = await tech
      .post(`/api/cases/${c.id}/specimens`)
      .send(buildSpecimenInput({ accepted: false, rejectionReason: 'Container cracked on arrival', transportCondition: 'thawed' }));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ accepted: false, rejectionReason: 'Container cracked on arrival' });
  });

  it.each([
    ['type', { type: 'blood' }],
    ['transportCondition', { transportCondition: 'warm' }],
    ['collectedAt', { collectedAt: hoursAgo(1), receivedAt: hoursAgo(2) }],
    ['receivedAt', { receivedAt: '' }],
    ['wetWeightMg', { wetWeightMg: 0 }],
  ])('when %s is not valid, then 400 names it and nothing is written', async (field, bad) => {
    const c = await createCase(tech);
    const before = await countRows(t.sequelize, 'specimens');
    const res = await tech.post(`/api/cases/${c.id}/specimens`).send({ ...buildSpecimenInput(), ...bad });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty(field);
    expect(await countRows(t.sequelize, 'specimens')).toBe(before);
  });

  it('when the case is missing, then 404; when it has gone for review, then 409 INVALID_STATE', async () => {
    expect((await tech.post('/api/cases/999999/specimens').send(buildSpecimenInput())).status).toBe(404);
    const c = await createCase(tech);
    await t.sequelize.query(`UPDATE cases SET state = 'awaiting_review' WHERE id = ${c.id}`);
    const res = await tech.post(`/api/cases/${c.id}/specimens`).send(buildSpecimenInput());
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
  });

  it('when a clinician or an admin sends a specimen, then 403', async () => {
    const c = await createCase(tech);
    for (const role of ['clinician', 'admin'] as const) {
      expect((await (await t.signedIn(role)).post(`/api/cases/${c.id}/specimens`).send(buildSpecimenInput())).status).toBe(403);
    }
  });
});

describe('PATCH /api/specimens/:id', () => {
  it('when a rejection is recorded on an accepted specimen, then it is rejected with the reason and the history says so', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const res = await tech.patch(`/api/specimens/${s.id}`).send({ accepted: false, rejectionReason: 'Thawed in transit', version: s.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ accepted: false, rejectionReason: 'Thawed in transit', version: s.version + 1 });
    const history = await tech.get(`/api/cases/${c.id}/history`);
    expect(history.body.items[0]).toMatchObject({ action: 'reject', summary: 'Specimen A rejected' });
    expect(history.body.items[0].changes).toEqual([
      { field: 'Receipt', before: 'Accepted', after: 'Rejected' },
      { field: 'Rejection reason', before: null, after: 'Thawed in transit' },
    ]);
  });

  it('when a rejection has no reason, then 400 names rejectionReason and the specimen stays accepted', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const res = await tech.patch(`/api/specimens/${s.id}`).send({ accepted: false, version: s.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('rejectionReason');
    expect((await tech.get(`/api/cases/${c.id}`)).body.specimens[0].accepted).toBe(true);
  });

  it('when an accepted specimen is given a reason without being rejected, then 400 names rejectionReason', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const res = await tech.patch(`/api/specimens/${s.id}`).send({ rejectionReason: 'Thawed in transit', version: s.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('rejectionReason');
  });

  it('when two people save the same specimen, then the second gets 409 STALE_VERSION and the first change stays', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const first = await tech.patch(`/api/specimens/${s.id}`).send({ wetWeightMg: 51.5, version: s.version });
    const second = await director.patch(`/api/specimens/${s.id}`).send({ wetWeightMg: 15.5, version: s.version });
    expect(first.status).toBe(200);
    expect(second.status).toBe(409);
    expect(second.body.error.code).toBe('STALE_VERSION');
    expect((await tech.get(`/api/cases/${c.id}`)).body.specimens[0].wetWeightMg).toBe(51.5);
  });

  it('when the receipt time is corrected, then the case list’s receipt follows', async () => {
    const c = await createCase(tech);
    const s = c.specimens[0]!;
    const earlier = hoursAgo(30);
    const res = await tech.patch(`/api/specimens/${s.id}`).send({ receivedAt: earlier, collectedAt: null, version: s.version });
    expect(res.status).toBe(200);
    const list = await tech.get(`/api/cases?q=${c.accession}`);
    expect(list.body.items[0].receivedAt).toBe(earlier);
  });

  it('when the specimen is missing, then 404; when the type is sent, then 400 (a type is fixed once received)', async () => {
    expect((await tech.patch('/api/specimens/999999').send({ wetWeightMg: 3, version: 0 })).status).toBe(404);
    const c = await createCase(tech);
    const res = await tech.patch(`/api/specimens/${c.specimens[0]!.id}`).send({ type: 'liver', version: 0 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('type');
  });

  it('when the case is cancelled, then the specimen can no longer be changed (409 INVALID_STATE)', async () => {
    const c = await createCase(tech);
    await tech.post(`/api/cases/${c.id}/cancel`).send({ reason: 'Withdrawn by the ward', version: c.version });
    const res = await tech.patch(`/api/specimens/${c.specimens[0]!.id}`).send({ wetWeightMg: 3, version: 0 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
  });

  it('when a specimen already has assay results, then it cannot be rejected (409 naming accepted) and the results stay', async () => {
    const c = await createCase(tech);
    const specimen = c.specimens[0]!;
    expect((await recordDirectProtein(tech, specimen, 4, 'Typed from the BCA sheet')).status).toBe(200);
    const saved = await tech
      .post(`/api/cases/${c.id}/measurements`)
      .send({ mode: 'rates', specimenId: specimen.id, assay: 'CS', replicate: 1, ...cuvette, totalRatePerMin: 0.05, backgroundRatePerMin: 0.001 });
    expect(saved.status).toBe(201);
    const current = (await tech.get(`/api/cases/${c.id}`)).body.specimens[0];
    const before = await countRows(t.sequelize, 'measurements');
    const res = await tech
      .patch(`/api/specimens/${specimen.id}`)
      .send({ accepted: false, rejectionReason: 'Thawed in transit', version: current.version });
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('accepted');
    expect(await countRows(t.sequelize, 'measurements')).toBe(before);
    expect((await tech.get(`/api/cases/${c.id}`)).body.specimens[0].accepted).toBe(true);
  });
});

describe('rejection reasons', () => {
  it('when the list is read, then the starter reasons are there', async () => {
    const res = await tech.get('/api/rejection-reasons');
    expect(res.status).toBe(200);
    expect(res.body.items.map((r: { text: string }) => r.text)).toEqual(
      expect.arrayContaining(['Thawed in transit', 'Too small for the requested assays', 'Unlabelled or mislabelled container']),
    );
  });

  it('when a director adds a reason, then it is listed; the same text again (any case) is 409 naming text', async () => {
    const res = await director.post('/api/rejection-reasons').send({ text: 'Haemolysed or clotted' });
    expect(res.status).toBe(201);
    expect((await tech.get('/api/rejection-reasons')).body.items.map((r: { text: string }) => r.text)).toContain('Haemolysed or clotted');
    const again = await director.post('/api/rejection-reasons').send({ text: 'HAEMOLYSED OR CLOTTED' });
    expect(again.status).toBe(409);
    expect(again.body.error.fields).toHaveProperty('text');
  });

  it('when a technologist adds a reason, then 403; when the text is too short, then 400 names text', async () => {
    const before = await countRows(t.sequelize, 'rejection_reasons');
    expect((await tech.post('/api/rejection-reasons').send({ text: 'Technologist idea' })).status).toBe(403);
    const short = await director.post('/api/rejection-reasons').send({ text: 'x' });
    expect(short.status).toBe(400);
    expect(short.body.error.fields).toHaveProperty('text');
    expect(await countRows(t.sequelize, 'rejection_reasons')).toBe(before);
  });

  it('when a clinician or an admin reads the list, then 403', async () => {
    for (const role of ['clinician', 'admin'] as const) {
      expect((await (await t.signedIn(role)).get('/api/rejection-reasons')).status).toBe(403);
    }
  });
});
