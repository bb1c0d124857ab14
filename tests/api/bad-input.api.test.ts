import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { labProfileSchema } from '@/schemas/lab-profile';
import { verificationResultSchema } from '@/schemas/reference-interval';
import { buildPatientInput, buildRegisterCaseInput, buildSpecimenInput, clinicianIds, createCase, createPatient } from '../factories/cases';
import { createCaseAwaitingReview } from '../factories/workup';
import { countRows, DEMO_PASSWORD, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Impossible input is refused with a 400 that names the field, and nothing is written (docs/testing.md).
 * Calendar facts are the Gregorian calendar's [confirmed: ISO 8601]; the IANA zone names are those of the
 * tz database [confirmed]; the characters refused are the C0/C1 controls and the bidirectional formatting
 * characters of Unicode UAX #9 [confirmed] (U+202A–U+202E embeddings/overrides, U+2066–U+2069 isolates).
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let admin: Agent;
let director: Agent;
let clinicianId: number;

beforeAll(async () => {
  t = await makeTestApp();
  [tech, admin, director] = await Promise.all([t.signedIn('technologist'), t.signedIn('admin'), t.signedIn('director')]);
  [clinicianId] = (await clinicianIds(tech)) as [number];
});
afterAll(() => t.close());

/** A calendar date n days from today (UTC), as YYYY-MM-DD. */
const daysFromToday = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);

describe('calendar dates', () => {
  it.each([
    ['2020-02-30', /not a day on the calendar/],
    ['2019-02-29', /not a day on the calendar/], // 2019 is not a leap year [confirmed: Gregorian rule]
    ['0000-00-00', /not a day on the calendar/],
    ['2019-13-01', /not a day on the calendar/],
    ['2019-04-31', /not a day on the calendar/], // April has 30 days [confirmed]
    ['1899-12-31', /before 1900-01-01/],
    [daysFromToday(3), /future/],
    ['14/05/2019', /YYYY-MM-DD/],
  ])('when a patient is registered born %s, then 400 names dateOfBirth and no patient is stored', async (dateOfBirth, message) => {
    const before = await countRows(t.sequelize, 'patients');
    const res = await tech.post('/api/patients').send({ ...buildPatientInput(), dateOfBirth });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('VALIDATION_FAILED');
    expect(res.body.error.fields.dateOfBirth).toMatch(message);
    expect(await countRows(t.sequelize, 'patients')).toBe(before);
  });

  it('when a real leap day or 1900-01-01 is given, then the patient is registered', async () => {
    // 2020 and 2000 are leap years (divisible by 4, and 2000 by 400) [confirmed: Gregorian rule].
    for (const dateOfBirth of ['2020-02-29', '2000-02-29', '1900-01-01']) {
      const res = await tech.post('/api/patients').send({ ...buildPatientInput(), dateOfBirth });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(res.body.dateOfBirth).toBe(dateOfBirth);
    }
  });

  it('when a correction sets an impossible date of birth, then 400 names it and the patient is unchanged', async () => {
    const p = await createPatient(tech, { dateOfBirth: '2011-07-15' });
    const res = await tech.patch(`/api/patients/${p.id}`).send({ dateOfBirth: '2011-02-30', version: p.version });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('dateOfBirth');
    const after = await tech.get(`/api/patients/${p.id}`);
    expect(after.body).toMatchObject({ dateOfBirth: '2011-07-15', version: p.version });
  });

  it.each([
    ['specimen.collectedAt', { collectedAt: '2026-02-30T10:00' }],
    ['specimen.collectedAt', { collectedAt: '0000-01-01T00:00' }],
    ['specimen.receivedAt', { receivedAt: '2026-02-30T10:00:00Z' }],
    ['specimen.receivedAt', { receivedAt: '2025-13-01T10:00' }],
    ['specimen.receivedAt', { receivedAt: '2025-06-01T24:30' }],
  ])('when a case is registered with %s impossible, then 400 names it and no case or specimen is stored', async (field, bad) => {
    const patient = await createPatient(tech);
    const [cases, specimens] = [await countRows(t.sequelize, 'cases'), await countRows(t.sequelize, 'specimens')];
    const body = buildRegisterCaseInput(patient.id, clinicianId);
    const res = await tech.post('/api/cases').send({ ...body, specimen: { ...buildSpecimenInput(), collectedAt: null, ...bad } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty(field);
    expect(await countRows(t.sequelize, 'cases')).toBe(cases);
    expect(await countRows(t.sequelize, 'specimens')).toBe(specimens);
  });

  it('when the case list is filtered from an impossible date, then 400 names "from"', async () => {
    const res = await tech.get('/api/cases?from=2026-02-30');
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('from');
  });
});

describe('names and free text', () => {
  const unsafe: [string, string][] = [
    ['NUL', 'Mar\u0000tin'],
    ['BEL', 'Mar\u0007tin'],
    ['ESC (terminal colour)', '\u001b[31mMartin'],
    ['C1 control', 'Mar\u0085tin'],
    ['right-to-left override', 'Martin\u202Egpj.exe'],
    ['left-to-right embedding', '\u202AMartin'],
    ['first-strong isolate', 'Mar\u2068tin\u2069'],
    ['right-to-left mark', 'Martin\u200F'],
    ['line break', 'Mar\ntin'],
  ];

  it.each(unsafe)('when a family name holds a %s, then 400 names familyName and no patient is stored', async (_what, familyName) => {
    const before = await countRows(t.sequelize, 'patients');
    const res = await tech.post('/api/patients').send({ ...buildPatientInput(), familyName });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.familyName).toMatch(/control or text-direction characters \(found U\+[0-9A-F]{4}/);
    expect(await countRows(t.sequelize, 'patients')).toBe(before);
  });

  it('when a given name holds a right-to-left override, then 400 names givenName', async () => {
    const res = await tech.post('/api/patients').send({ ...buildPatientInput(), givenName: 'Al\u202Eba' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.givenName).toMatch(/U\+202E at position 3/);
  });

  it('when names use letters of any script, accents or apostrophes, then they are accepted as typed', async () => {
    for (const [familyName, givenName] of [
      ["O'Brien-Zoë", 'Niamh'],
      ['Nguyễn', 'Thị Lan'],
      ['عائشة', 'ليلى'],
      ['שרה', 'כהן'],
    ] as const) {
      const res = await tech.post('/api/patients').send(buildPatientInput({ familyName, givenName }));
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(res.body).toMatchObject({ familyName, givenName });
    }
  });

  it('when an account is created or renamed with control characters, then 400 names the field and nothing changes', async () => {
    const before = await countRows(t.sequelize, 'users');
    const res = await admin.post('/api/users').send({
      email: 'bidi.test@example.test',
      name: 'Dr \u202EEvil',
      role: 'technologist',
      password: 'a long enough fixture password',
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('name');
    expect(await countRows(t.sequelize, 'users')).toBe(before);

    const list = (await admin.get('/api/users')).body.items as { id: number; name: string; version: number }[];
    const someone = list[0]!;
    const rename = await admin.patch(`/api/users/${someone.id}`).send({ title: 'Head\u0007', version: someone.version });
    expect(rename.status).toBe(400);
    expect(rename.body.error.fields).toHaveProperty('title');
  });

  it('when a clinical indication has line breaks and tabs, then it is kept; an override in it is refused', async () => {
    const patient = await createPatient(tech);
    const ok = await tech
      .post('/api/cases')
      .send(buildRegisterCaseInput(patient.id, clinicianId, { clinicalIndication: 'Hypotonia.\n\tLactate 4.1 mmol/L.' }));
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    const before = await countRows(t.sequelize, 'cases');
    const bad = await tech
      .post('/api/cases')
      .send({ ...buildRegisterCaseInput(patient.id, clinicianId), clinicalIndication: 'Hypotonia \u202Enaelc\u202C' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('clinicalIndication');
    expect(await countRows(t.sequelize, 'cases')).toBe(before);
  });
});

describe('the laboratory time zone', () => {
  async function profile() {
    const res = await admin.get('/api/lab-profile');
    expect(res.status).toBe(200);
    return labProfileSchema.parse(res.body);
  }

  it.each(['Europe/Londn', 'Mars/Olympus_Mons', '+01:00', 'GMT+25', ''])(
    'when an admin saves the zone "%s", then 400 names timeZone and the profile is unchanged',
    async (timeZone) => {
      const before = await profile();
      const res = await admin.put('/api/lab-profile').send({ ...before, timeZone });
      expect(res.status).toBe(400);
      expect(res.body.error.fields).toHaveProperty('timeZone');
      expect(await profile()).toEqual(before);
    },
  );

  it('when an admin saves UTC, an alias or a real zone, then it is accepted', async () => {
    const original = await profile();
    try {
      for (const timeZone of ['UTC', 'Etc/GMT+5', 'America/Argentina/Buenos_Aires', 'Europe/London']) {
        const current = await profile();
        const res = await admin.put('/api/lab-profile').send({ ...current, timeZone });
        expect(res.status, JSON.stringify(res.body)).toBe(200);
        expect(res.body.timeZone).toBe(timeZone);
        expect(res.body.timeZoneNotice).toBeNull();
      }
    } finally {
      const current = await profile();
      await admin.put('/api/lab-profile').send({ ...current, timeZone: original.timeZone });
    }
  });

  it('when a bad zone is already in the database, then case lists, registration and signing keep working in UTC with a notice', async () => {
    const original = await profile();
    const awaiting = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    await t.sequelize.query(`UPDATE lab_profiles SET "timeZone" = 'Europe/Londn'`);
    try {
      const shown = await profile();
      expect(shown.timeZone).toBe('UTC');
      expect(shown.timeZoneNotice).toMatch(/"Europe\/Londn" is not a known IANA zone/);

      const list = await tech.get(`/api/cases?from=${daysFromToday(-30)}&to=${daysFromToday(0)}`);
      expect(list.status, JSON.stringify(list.body)).toBe(200);
      expect(list.body.total).toBeGreaterThan(0);

      const registered = await createCase(tech, {
        referringClinicianId: clinicianId,
        specimen: buildSpecimenInput({ collectedAt: '2026-01-10T08:00', receivedAt: '2026-01-10T11:30' }),
      });
      // With the UTC fallback, wall-clock times are read as UTC [derived: zone offset 0].
      expect(registered.specimens[0]!.receivedAt).toBe('2026-01-10T11:30:00.000Z');

      const signed = await director
        .post(`/api/cases/${awaiting.id}/sign`)
        .send({ password: DEMO_PASSWORD, interpretation: 'Fixture interpretation written while the zone is wrong.', version: awaiting.version });
      expect(signed.status, JSON.stringify(signed.body)).toBe(201);

      // Saving the profile as read (with its notice) fixes the zone.
      const fixed = await admin.put('/api/lab-profile').send({ ...shown, timeZone: 'Europe/London' });
      expect(fixed.status, JSON.stringify(fixed.body)).toBe(200);
      expect(fixed.body).toMatchObject({ timeZone: 'Europe/London', timeZoneNotice: null });
    } finally {
      await t.sequelize.query(`UPDATE lab_profiles SET "timeZone" = :zone`, { replacements: { zone: original.timeZone } });
    }
  });
});

describe('interval verification with pasted values', () => {
  /** 20 invented local values with a decimal comma each, one per line, as a spreadsheet in a comma locale copies them. */
  const commaColumn = Array.from({ length: 20 }, (_, i) => `${37 + (i % 7)},${(i * 3) % 10}`).join('\n');

  it('when the values use decimal commas, then 400 names values and the line, and no verdict is given', async () => {
    const res = await director.post('/api/reference-intervals/verify').send({ lower: 30, upper: 50, values: commaColumn });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.values).toMatch(/^Line 1: "37,0" looks like a decimal comma; use a point \(37\.0\)/);
    expect(res.body).not.toHaveProperty('decision');
  });

  it('when the second set has a decimal comma on line 3, then 400 names additionalValues and line 3', async () => {
    const points = Array.from({ length: 20 }, (_, i) => (60 + i).toFixed(1)).join('\n');
    const second = points.split('\n').map((v, i) => (i === 2 ? v.replace('.', ',') : v)).join('\n');
    const res = await director.post('/api/reference-intervals/verify').send({ lower: 30, upper: 50, values: points, additionalValues: second });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.additionalValues).toMatch(/^Line 3: "62,0" looks like a decimal comma/);
  });

  it('when the same values are pasted with decimal points, then 20 values are counted and a verdict is given', async () => {
    const res = await director
      .post('/api/reference-intervals/verify')
      .send({ lower: 30, upper: 50, values: commaColumn.replaceAll(',', '.') });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const body = verificationResultSchema.parse(res.body);
    expect(body.firstRound.n).toBe(20);
    // Every value lies in 37.0–43.9, inside 30–50, so none is outside [derived by hand].
    expect(body.firstRound.outside).toBe(0);
    expect(body.decision).toBe('verified');
  });
});
