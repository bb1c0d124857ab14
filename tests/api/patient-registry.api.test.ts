import { createHash } from 'node:crypto';
import type request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EXISTING_PATIENT_FIELD, type Patient } from '@/schemas/case';
import type { ReportDetail } from '@/schemas/report';
import { buildPatientInput, buildSpecimenInput, createPatient } from '../factories/cases';
import { collapse, readPdf, type PdfPage } from '../factories/pdf-text';
import { accountId, createCaseAwaitingReview } from '../factories/workup';
import type { Agent } from '../setup/lab-staff';
import { signInAll } from '../setup/signed-in-agents';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Registry corrections: a different person who shares a name and birth date is registered only with a recorded
 * reason; a patient's details are corrected without touching signed reports, whose stored document and PDF bytes
 * stay as signed (CLIA 42 CFR 493.1291(k): the original report is kept [confirmed, docs/domain.md §5]); later
 * reports print the corrected details, the age at collection and the laboratory's telephone (CLIA
 * 493.1291(c)(1)–(2): patient identification and the laboratory's name and address [confirmed]; telephone and
 * age as the laboratory profile promises [common practice]). PDFs are read with pdfjs-dist and hashed with
 * node:crypto, not with the server's code.
 */

let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let admin: Agent;
let clinicianId: number;

beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, clinician, admin] = await signInAll(t, ['technologist', 'director', 'clinician', 'admin']);
  clinicianId = await accountId(admin, 'clinician@demo.test');
});
afterAll(() => t.close());

const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');

function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

/**
 * The values of the first page's patient column, top to bottom (labels left out): pieces right of the label
 * column ('Name' label + its width) and left of the CASE column, above the clinical indication.
 */
function patientValues(page: PdfPage): string {
  const find = (s: string) => {
    const p = page.pieces.find((x) => x.str.trim() === s);
    if (!p) throw new Error(`no piece '${s}'`);
    return p;
  };
  const [name, kase, indication] = [find('Name'), find('CASE'), find('Clinical indication')];
  const valueX = page.pieces.filter((p) => Math.abs(p.y - name.y) < 0.5 && p.x > name.x + name.w && p.x < kase.x)[0]!.x;
  const inColumn = page.pieces
    .filter((p) => p.x >= valueX - 1 && p.x < kase.x - 1 && p.y > indication.y && p.y <= name.y + 0.5)
    .sort((a, b) => b.y - a.y || a.x - b.x);
  return collapse(inColumn.map((p) => p.str).join(' '));
}

async function patientAudit(id: number): Promise<{ action: string; note: string | null }[]> {
  const res = await director.get('/api/audit').query({ entity: 'patient', entityId: String(id) });
  expect(res.status).toBe(200);
  return res.body.items as { action: string; note: string | null }[];
}

describe('registering a different person with the same name and date of birth', () => {
  let first: Patient;
  const same = { familyName: 'Quillfeather', givenName: 'Noor', dateOfBirth: '2016-09-03' } as const;

  beforeAll(async () => {
    first = await createPatient(tech, same);
  });

  it('without a confirmation the existing 409 stays, naming the registered patient; nothing is written', async () => {
    const before = await countRows(t.sequelize, 'patients');
    // Same name written differently (case, accent) is the same name.
    const res = await tech.post('/api/patients').send(buildPatientInput({ ...same, familyName: 'QUILLFEATHER', givenName: 'Nóor' }));
    expect(res.status).toBe(409);
    expect(res.body.error.fields[EXISTING_PATIENT_FIELD]).toBe(String(first.id));
    expect(Object.keys(res.body.error.fields)).toEqual(expect.arrayContaining(['familyName', 'givenName', 'dateOfBirth']));
    expect(await countRows(t.sequelize, 'patients')).toBe(before);
  });

  it('refuses a half confirmation or a confirmation against the wrong patient with 400 naming the field', async () => {
    const before = await countRows(t.sequelize, 'patients');
    const other = await createPatient(tech, { familyName: 'Unrelated', givenName: 'Ivo', dateOfBirth: '2001-01-01' });
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ confirmDistinctFrom: first.id }, 'distinctReason'],
      [{ distinctReason: 'Different parents and hospital number' }, 'confirmDistinctFrom'],
      [{ confirmDistinctFrom: first.id, distinctReason: '  ' }, 'distinctReason'],
      [{ confirmDistinctFrom: other.id, distinctReason: 'Different parents and hospital number' }, 'confirmDistinctFrom'],
      [{ confirmDistinctFrom: 'one', distinctReason: 'Different parents and hospital number' }, 'confirmDistinctFrom'],
    ];
    for (const [extra, field] of cases) {
      const res = await tech.post('/api/patients').send({ ...buildPatientInput(same), ...extra });
      expect(res.status, JSON.stringify(extra)).toBe(400);
      expect(res.body.error.fields, JSON.stringify(extra)).toHaveProperty(field);
    }
    expect(await countRows(t.sequelize, 'patients')).toBe(before + 1); // only `other`
  });

  it('never overrides a clash of lab patient ID', async () => {
    const res = await tech
      .post('/api/patients')
      .send({ ...buildPatientInput({ ...same, labPatientId: first.labPatientId }), confirmDistinctFrom: first.id, distinctReason: 'Twin sibling' });
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('labPatientId');
  });

  it('registers them with a reason, recorded in the audit trail with the patient it was told apart from', async () => {
    const reason = 'Different mother and referring hospital number; confirmed by phone with the ward';
    const res = await tech.post('/api/patients').send({ ...buildPatientInput(same), confirmDistinctFrom: first.id, distinctReason: reason });
    expect(res.status).toBe(201);
    expect(res.body).not.toHaveProperty('distinctReason');
    const created = await patientAudit(res.body.id as number);
    const note = created.find((e) => e.action === 'create')?.note ?? '';
    expect(note).toContain(reason);
    expect(note).toContain(first.labPatientId);
    // The first patient is untouched.
    expect((await tech.get(`/api/patients/${first.id}`)).body).toEqual(first);
  });

  it('two parallel confirmed registrations with one new lab ID: exactly one is written', async () => {
    const before = await countRows(t.sequelize, 'patients');
    const input = { ...buildPatientInput(same), confirmDistinctFrom: first.id, distinctReason: 'Cousin with the same name' };
    const results = await Promise.all([tech.post('/api/patients').send(input), director.post('/api/patients').send(input)]);
    expect(results.map((r) => r.status).sort()).toEqual([201, 409]);
    expect(await countRows(t.sequelize, 'patients')).toBe(before + 1);
  });

  it('a correction that makes a patient share a name and birth date needs the same confirmation', async () => {
    const p = await createPatient(tech, { familyName: 'Quillfeathers', givenName: 'Noor', dateOfBirth: same.dateOfBirth });
    const plain = await tech.patch(`/api/patients/${p.id}`).send({ familyName: same.familyName, version: p.version });
    expect(plain.status).toBe(409);
    const confirmed = await tech
      .patch(`/api/patients/${p.id}`)
      .send({ familyName: same.familyName, version: p.version, confirmDistinctFrom: first.id, distinctReason: 'Spelling fixed; a different child' });
    expect(confirmed.status).toBe(200);
    expect((await patientAudit(p.id)).find((e) => e.action === 'update')?.note).toContain('Spelling fixed; a different child');
  });
});

describe('correcting a patient’s details', () => {
  let patient: Patient;
  let signed: ReportDetail;
  let signedPdf: Buffer;
  let storedDocument: string;

  async function signNew(collectedAt: string): Promise<ReportDetail> {
    const c = await createCaseAwaitingReview(tech, {
      referringClinicianId: clinicianId,
      overrides: {
        patientId: patient.id,
        specimen: buildSpecimenInput({ collectedAt, receivedAt: new Date(Date.parse(collectedAt) + 20 * 3600_000).toISOString() }),
      },
    });
    const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD, interpretation: 'Fixture interpretation.', version: c.version });
    expect(res.status).toBe(201);
    return res.body.report as ReportDetail;
  }

  async function documentOf(reportId: number): Promise<string> {
    const [rows] = await t.sequelize.query('SELECT document FROM reports WHERE id = ?', { replacements: [reportId] });
    return (rows as { document: string }[])[0]!.document;
  }

  beforeAll(async () => {
    patient = await createPatient(tech, { familyName: 'Brambleworth', givenName: 'Tomas', dateOfBirth: '2023-12-30' });
    signed = await signNew('2025-03-01T10:00:00Z');
    signedPdf = (await binary(clinician.get(`/api/reports/${signed.id}/pdf`))).body as Buffer;
    storedDocument = await documentOf(signed.id);
  });

  it('refuses bad input (400 naming the field), a stale version (409) and a clinician (403); nothing changes', async () => {
    const bad = await tech.patch(`/api/patients/${patient.id}`).send({ dateOfBirth: '2023-02-30', version: patient.version });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty('dateOfBirth');
    const blank = await tech.patch(`/api/patients/${patient.id}`).send({ familyName: ' ', version: patient.version });
    expect(blank.status).toBe(400);
    expect(blank.body.error.fields).toHaveProperty('familyName');
    expect((await tech.patch(`/api/patients/${patient.id}`).send({ familyName: 'X', version: patient.version + 5 })).status).toBe(409);
    expect((await clinician.patch(`/api/patients/${patient.id}`).send({ familyName: 'X', version: patient.version })).status).toBe(403);
    expect((await tech.get(`/api/patients/${patient.id}`)).body).toEqual(patient);
  });

  it('two parallel corrections from the same version: one is saved, the other is told it is stale', async () => {
    const [a, b] = await Promise.all([
      tech.patch(`/api/patients/${patient.id}`).send({ givenName: 'Tomasz', version: patient.version }),
      director.patch(`/api/patients/${patient.id}`).send({ givenName: 'Thomas', version: patient.version }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    patient = (await tech.get(`/api/patients/${patient.id}`)).body as Patient;
    expect(patient.version).toBe(1);
  });

  it('the correction is saved and audited; the signed report, its stored document and PDF bytes stay exactly as signed', async () => {
    const res = await tech
      .patch(`/api/patients/${patient.id}`)
      .send({ familyName: 'Bramblewood', dateOfBirth: '2023-11-30', version: patient.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ familyName: 'Bramblewood', dateOfBirth: '2023-11-30', version: patient.version + 1 });
    const audit = (await patientAudit(patient.id)).filter((e) => e.action === 'update');
    expect(audit.length).toBeGreaterThanOrEqual(2);

    const again = await binary(clinician.get(`/api/reports/${signed.id}/pdf`));
    expect(Buffer.compare(again.body as Buffer, signedPdf)).toBe(0);
    expect(again.headers.etag).toBe(`"${sha256(signedPdf)}"`);
    expect(await documentOf(signed.id)).toBe(storedDocument);
    expect(sha256(storedDocument)).toBe(signed.documentSha256);
    const detail = await clinician.get(`/api/reports/${signed.id}`);
    expect(detail.body.patientName).toBe(signed.patientName);
    expect(detail.body.patientName).toContain('Brambleworth');
    expect(detail.body.dateOfBirth).toBe('2023-12-30');
    const oldText = (await readPdf(signedPdf)).flat;
    expect(oldText).toContain('Brambleworth');
    const oldPatient = patientValues((await readPdf(signedPdf)).pages[0]!);
    expect(oldPatient).toBe(`Brambleworth, Tomas ${patient.labPatientId} 30 Dec 2023 1 year 2 months Female`);
    // Born 30 Dec 2023, collected 1 Mar 2025: 14 months on 28 Feb 2025 (hand-worked) → 1 year 2 months.
  });

  it('a report signed after the correction prints the corrected name, birth date and age, and the telephone', async () => {
    const later = await signNew('2025-03-01T10:00:00Z');
    const pdf = (await binary(clinician.get(`/api/reports/${later.id}/pdf`))).body as Buffer;
    const read = await readPdf(pdf);
    const text = read.flat;
    expect(text).toContain(`Bramblewood, ${patient.givenName}`);
    expect(text).not.toContain('Brambleworth');
    expect(text).toContain('30 Nov 2023');
    // Born 30 Nov 2023: 15 months would fall on 30 Feb 2025, which does not exist, so on 1 Mar 2025 (hand-worked).
    expect(patientValues(read.pages[0]!)).toMatch(/ 30 Nov 2023 1 year 3 months /);
    // The demo laboratory's telephone, as its profile holds it.
    const profile = await tech.get('/api/lab-profile');
    expect(text).toContain(`Telephone ${profile.body.phone as string}`);
  });

  it('a report of a case without a recorded collection time says the age is not known, and why', async () => {
    const c = await createCaseAwaitingReview(tech, {
      referringClinicianId: clinicianId,
      overrides: { patientId: patient.id, specimen: buildSpecimenInput({ collectedAt: null }) },
    });
    const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD, interpretation: 'Fixture interpretation.', version: c.version });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const pdf = (await binary(clinician.get(`/api/reports/${(res.body.report as ReportDetail).id}/pdf`))).body as Buffer;
    expect(patientValues((await readPdf(pdf)).pages[0]!)).toContain('Not known (collection date not recorded)');
  });
});
