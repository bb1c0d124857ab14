import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EXISTING_PATIENT_FIELD } from '@/schemas/case';
import { buildPatientInput, createCase, createPatient } from '../factories/cases';
import { countRows, makeTestApp, ORIGIN, type TestApp } from '../setup/test-app';

let t: TestApp;
let tech: Awaited<ReturnType<TestApp['signedIn']>>;
beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
});
afterAll(() => t.close());

describe('POST /api/patients', () => {
  it('when a technologist registers a patient, then 201 with the lab ID in capitals, and the audit trail records it', async () => {
    // Arrange
    const input = buildPatientInput({ labPatientId: 'fx-lower-1' });
    // Act
    const res = await tech.post('/api/patients').send(input);
    // Assert
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ labPatientId: 'FX-LOWER-1', familyName: input.familyName, version: 0 });
    const [events] = await t.sequelize.query(`SELECT action FROM audit_events WHERE entity = 'patient' AND "entityId" = '${res.body.id}'`);
    expect(events).toEqual([{ action: 'create' }]);
  });

  it('when patients are registered, then their details are bound, never written into the SQL text, and each registration sends the same statements', async () => {
    // Two registrations with different details; each statement's text is recorded as the database receives it.
    const inputs = [buildPatientInput({ familyName: 'Boundwell', givenName: 'Ottilie' }), buildPatientInput({ familyName: 'Paramsby', givenName: 'Rune' })];
    const texts: string[][] = [];
    // Sequelize's own option (its types leave it out): every statement passes through it.
    const options = (t.sequelize as unknown as { options: { logging: unknown } }).options;
    const logging = options.logging;
    try {
      for (const input of inputs) {
        const sent: string[] = [];
        options.logging = (sql: string) => sent.push(sql.replace(/^Executing \([^)]*\): /, ''));
        expect((await tech.post('/api/patients').send(input)).status).toBe(201);
        texts.push(sent);
      }
    } finally {
      options.logging = logging;
    }
    // On SQLite a text that never changes is prepared once per connection and run again (server/db/sqlite-connections.ts);
    // a value spliced into the text would also put a patient's name into any SQL log.
    for (const [i, input] of inputs.entries()) {
      for (const value of [input.familyName, input.givenName, input.labPatientId, input.labPatientId.toUpperCase(), input.dateOfBirth]) {
        expect(texts[i]!.filter((sql) => sql.toLowerCase().includes(value.toLowerCase()))).toEqual([]);
      }
    }
    expect(texts[0]!.length).toBeGreaterThanOrEqual(3); // the duplicate check, the patient, the audit event
    expect(texts[1]).toEqual(texts[0]);
  });

  it.each([
    ['familyName', { familyName: '' }],
    ['labPatientId', { labPatientId: 'has space' }],
    ['dateOfBirth', { dateOfBirth: '3999-01-01' }],
    ['dateOfBirth', { dateOfBirth: '12/05/2019' }],
    ['sex', { sex: 'x' }],
  ])('when %s is not valid, then 400 names it and nothing is written', async (field, bad) => {
    const before = await countRows(t.sequelize, 'patients');
    const res = await tech.post('/api/patients').send({ ...buildPatientInput(), ...bad });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields).toHaveProperty(field);
    expect(await countRows(t.sequelize, 'patients')).toBe(before);
  });

  it('when the lab ID is already registered (in any letter case), then 409 names labPatientId and gives the existing id', async () => {
    const existing = await createPatient(tech, { labPatientId: 'FX-DUP-7' });
    const before = await countRows(t.sequelize, 'patients');
    const res = await tech.post('/api/patients').send(buildPatientInput({ labPatientId: 'fx-dup-7' }));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(res.body.error.fields).toHaveProperty('labPatientId');
    expect(res.body.error.fields[EXISTING_PATIENT_FIELD]).toBe(String(existing.id));
    // Says whose ID it is, naming the ID once (it was said twice, "…FX-DUP-7 is already registered: …, lab ID FX-DUP-7").
    const said = res.body.error.fields.labPatientId as string;
    expect(said).toBe(`Lab patient ID FX-DUP-7 already belongs to ${existing.familyName}, ${existing.givenName}, born ${existing.dateOfBirth}`);
    expect(res.body.error.message).toBe(`${said}. Use that patient instead of registering a new one.`);
    expect(await countRows(t.sequelize, 'patients')).toBe(before);
  });

  it('when the same name and date of birth are registered again with other spacing, case and accents, then 409 with the existing id', async () => {
    const existing = await createPatient(tech, { familyName: "O'Dowd-Zoë", givenName: 'Niamh', dateOfBirth: '2012-02-29' });
    const res = await tech
      .post('/api/patients')
      .send(buildPatientInput({ familyName: 'o dowd-zoe', givenName: '  NIAMH', dateOfBirth: '2012-02-29' }));
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('familyName');
    expect(res.body.error.fields).toHaveProperty('dateOfBirth');
    expect(res.body.error.fields[EXISTING_PATIENT_FIELD]).toBe(String(existing.id));
  });

  it('when the same name has another date of birth, then it is a different patient', async () => {
    await createPatient(tech, { familyName: 'Samename', givenName: 'Kit', dateOfBirth: '2001-01-01' });
    const res = await tech.post('/api/patients').send(buildPatientInput({ familyName: 'Samename', givenName: 'Kit', dateOfBirth: '2001-01-02' }));
    expect(res.status).toBe(201);
  });

  it('when there is no session, then 401; when a clinician or an admin asks, then 403', async () => {
    const anon = await request(t.app).post('/api/patients').set('Origin', ORIGIN).send(buildPatientInput());
    expect(anon.status).toBe(401);
    for (const role of ['clinician', 'admin'] as const) {
      const agent = await t.signedIn(role);
      const res = await agent.post('/api/patients').send(buildPatientInput());
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('FORBIDDEN');
    }
  });
});

describe('GET /api/patients/search', () => {
  it('when part of a name is typed, in either order, then the patient is found', async () => {
    const p = await createPatient(tech, { familyName: 'Wintergreen', givenName: 'Solveig', labPatientId: 'FX-WG-1' });
    for (const q of ['winterg', 'solveig winter', 'SOLV', 'fx-wg', '2014-06-01 wintergreen']) {
      const res = await tech.get(`/api/patients/search?q=${encodeURIComponent(q)}`);
      expect(res.status).toBe(200);
      expect(res.body.items.map((x: { id: number }) => x.id)).toContain(p.id);
    }
    const miss = await tech.get('/api/patients/search?q=wintergreen%20zzz');
    expect(miss.body.items).toEqual([]);
  });

  it('when nothing is typed, then no patients are listed', async () => {
    const res = await tech.get('/api/patients/search?q=');
    expect(res.status).toBe(200);
    expect(res.body.items).toEqual([]);
  });

  it('when the query is longer than 80 characters, then 400 names q', async () => {
    const res = await tech.get(`/api/patients/search?q=${'a'.repeat(81)}`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('q');
  });
});

describe('GET and PATCH /api/patients/:id', () => {
  it('when the patient does not exist, then 404', async () => {
    expect((await tech.get('/api/patients/999999')).status).toBe(404);
    const res = await tech.patch('/api/patients/999999').send({ givenName: 'X', version: 0 });
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
  });

  it('when a name is corrected, then the case list finds the case by the new name', async () => {
    const c = await createCase(tech, { patient: { familyName: 'Misspeld' } });
    const res = await tech.patch(`/api/patients/${c.patient.id}`).send({ familyName: 'Misspelled', version: c.patient.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ familyName: 'Misspelled', version: c.patient.version + 1 });
    const list = await tech.get('/api/cases?q=misspelled');
    expect(list.body.items.map((x: { id: number }) => x.id)).toEqual([c.id]);
    expect(list.body.items[0].patientName).toBe(`Misspelled, ${c.patient.givenName}`);
    const history = await tech.get(`/api/cases/${c.id}/history`);
    expect(history.body.items[0]).toMatchObject({ summary: 'Patient details corrected' });
    expect(history.body.items[0].changes).toEqual([{ field: 'Family name', before: 'Misspeld', after: 'Misspelled' }]);
  });

  it('when two people save the same patient, then the second gets 409 STALE_VERSION and the first change stays', async () => {
    const p = await createPatient(tech);
    const first = await tech.patch(`/api/patients/${p.id}`).send({ givenName: 'Firstsave', version: p.version });
    expect(first.status).toBe(200);
    const second = await tech.patch(`/api/patients/${p.id}`).send({ givenName: 'Secondsave', version: p.version });
    expect(second.status).toBe(409);
    expect(second.body.error.code).toBe('STALE_VERSION');
    expect((await tech.get(`/api/patients/${p.id}`)).body.givenName).toBe('Firstsave');
  });

  it('when a correction would duplicate another patient, then 409 with that patient’s id', async () => {
    const a = await createPatient(tech, { labPatientId: 'FX-KEEP-1' });
    const b = await createPatient(tech);
    const res = await tech.patch(`/api/patients/${b.id}`).send({ labPatientId: 'FX-KEEP-1', version: b.version });
    expect(res.status).toBe(409);
    expect(res.body.error.fields[EXISTING_PATIENT_FIELD]).toBe(String(a.id));
  });
});
