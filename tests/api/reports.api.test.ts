import { createHash } from 'node:crypto';
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';
import type request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { storedAssayDefinitionSchema } from '@/schemas/assay';
import type { CaseDetail, Specimen } from '@/schemas/case';
import type { AssayCode } from '@/schemas/common';
import { transportConditionLabels } from '@/schemas/case';
import { reportCaution } from '@/schemas/report-document';
import { reportListItemSchema, type ReportDetail } from '@/schemas/report';
import type { CaseResults } from '@/schemas/results';
import { buildSpecimenInput, createCase } from '../factories/cases';
import { accountId, createCaseAwaitingReview, isolatedComplexI, nearMeans } from '../factories/workup';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Signing and reading reports through the API. What a report must carry is checked against US CLIA
 * 42 CFR 493.1291(c)(1)–(7) and (k) [confirmed, docs/domain.md §5]; the signature manifestation (printed
 * name, date and time, meaning) against 21 CFR Part 11 [from memory]. The PDF is read back with pdfjs-dist,
 * an independent PDF reader, and hashed with node:crypto, not with the server's own code.
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let director: Agent;
let clinician: Agent;
let clinician2: Agent;
let admin: Agent;
let clinicianId: number;
let clinician2Id: number;

beforeAll(async () => {
  t = await makeTestApp();
  [tech, director, clinician, clinician2, admin] = await Promise.all([
    t.signedIn('technologist'),
    t.signedIn('director'),
    t.signedIn('clinician'),
    t.signedIn('clinician2'),
    t.signedIn('admin'),
  ]);
  clinicianId = await accountId(admin, 'clinician@demo.test');
  clinician2Id = await accountId(admin, 'clinician2@demo.test');
});
afterAll(() => t.close());

const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');
const collapse = (s: string) => s.replace(/\s+/g, ' ').trim();

/** All text of a PDF, whitespace collapsed, pages joined. */
async function pdfText(bytes: Buffer): Promise<string> {
  const pdf = await getDocument({ data: new Uint8Array(bytes), isEvalSupported: false, verbosity: 0 }).promise;
  const pages: string[] = [];
  for (let n = 1; n <= pdf.numPages; n++) {
    const content = await (await pdf.getPage(n)).getTextContent();
    pages.push(content.items.map((i) => ('str' in i ? `${i.str}${i.hasEOL ? ' ' : ''}` : '')).join(''));
  }
  await pdf.destroy();
  return collapse(pages.join(' '));
}

/** A supertest response body as a Buffer (PDFs come back binary). */
function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

async function sign(caseId: number, body: Record<string, unknown> = {}) {
  return director.post(`/api/cases/${caseId}/sign`).send({ password: DEMO_PASSWORD, ...body });
}

async function reportOf(caseId: number): Promise<ReportDetail[]> {
  const res = await tech.get(`/api/cases/${caseId}/reports`);
  expect(res.status).toBe(200);
  return res.body.items as ReportDetail[];
}

describe('signing a case', () => {
  let c: CaseDetail;
  let results: CaseResults;
  let signed: ReportDetail;
  let pdf: Buffer;
  let text: string;
  const interpretation =
    'Complex I is low relative to citrate synthase and to complex II in this fixture specimen. Fixture sentence ZX-41 for the text check.';

  beforeAll(async () => {
    c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    results = (await tech.get(`/api/cases/${c.id}/results`)).body as CaseResults;
    const res = await sign(c.id, { interpretation, version: c.version });
    expect(res.status).toBe(201);
    signed = res.body.report as ReportDetail;
    const file = await binary(clinician.get(`/api/reports/${signed.id}/pdf`));
    expect(file.status).toBe(200);
    pdf = file.body as Buffer;
    text = await pdfText(pdf);
  });

  it('when the director signs with the password, then the case is final and version 1 is recorded with signer, time and meaning', async () => {
    const after = await tech.get(`/api/cases/${c.id}`);
    expect(after.body.state).toBe('final');
    expect(signed).toMatchObject({ caseId: c.id, accession: c.accession, version: 1, status: 'final', signedBy: 'Dr Ilse Marchetti' });
    expect(signed.meaning).toBe('Reviewed and approved for release');
    expect(Math.abs(Date.parse(signed.signedAt) - Date.now())).toBeLessThan(60_000);
    const audit = await director.get(`/api/audit?caseId=${c.id}`);
    const signEvent = (audit.body.items as { action: string; after: { pdfSha256: string } }[]).find((e) => e.action === 'sign');
    expect(signEvent?.after.pdfSha256).toBe(signed.pdfSha256);
  });

  it('when the PDF is downloaded, then its SHA-256 equals the stored one and the quoted ETag', async () => {
    const file = await binary(clinician.get(`/api/reports/${signed.id}/pdf`));
    expect(file.headers['content-type']).toBe('application/pdf');
    const served = sha256(file.body as Buffer);
    expect(served).toBe(signed.pdfSha256);
    // RFC 9110 §8.8.3: an entity tag is a quoted string.
    expect(file.headers.etag).toBe(`"${served}"`);
    const [row] = (await t.sequelize.query('SELECT "pdfSha256", document, "documentSha256" FROM reports WHERE id = ?', {
      replacements: [signed.id],
    }))[0] as { pdfSha256: string; document: string; documentSha256: string }[];
    expect(row!.pdfSha256).toBe(served);
    expect(row!.documentSha256).toBe(sha256(row!.document));
  });

  it('when the browser already holds that version, then If-None-Match answers 304', async () => {
    const again = await clinician.get(`/api/reports/${signed.id}/pdf`).set('If-None-Match', `"${signed.pdfSha256}"`);
    expect(again.status).toBe(304);
  });

  it('when JSON about the case and its report is read, then no cache may keep it and no ETag is sent; the PDF keeps its own validator', async () => {
    // RFC 9111 §5.2.2.5: no-store, for answers that carry patients' data. The PDF's validator is its stored SHA-256
    // (RFC 9110 §8.8.3), and it is revalidated on every use (no-cache, RFC 9111 §5.2.2.4).
    for (const path of [`/api/cases/${c.id}`, `/api/reports/${signed.id}`, '/api/cases', `/api/nothing-here`]) {
      const res = await clinician.get(path);
      expect(res.headers['cache-control'], path).toBe('no-store');
      expect(res.headers.etag, path).toBeUndefined();
    }
    const pdf = await clinician.get(`/api/reports/${signed.id}/pdf`);
    expect(pdf.headers['cache-control']).toBe('private, no-cache');
    expect(pdf.headers.etag).toBe(`"${signed.pdfSha256}"`);
  });

  it('then the PDF carries patient identity, laboratory, report date, specimen, results with units and interval versions (CLIA 493.1291(c))', async () => {
    // (c)(1) patient name and ID number
    expect(text).toContain(`${c.patient.familyName}, ${c.patient.givenName}`);
    expect(text).toContain(c.patient.labPatientId);
    // (c)(2) name and address of the performing laboratory
    const lab = (await tech.get('/api/lab-profile')).body as { name: string; addressLines: string[] };
    expect(text).toContain(lab.name);
    for (const line of lab.addressLines) expect(text).toContain(line);
    // (c)(3) report date, printed day month-name year in the laboratory's zone
    const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', day: 'numeric', month: 'short', year: 'numeric' })
      .formatToParts(new Date(signed.signedAt));
    const get = (k: string) => parts.find((p) => p.type === k)?.value;
    expect(text).toContain(`Report date ${get('day')} ${get('month')} ${get('year')}`);
    // (c)(4) test performed and (c)(5) specimen source and condition
    for (const a of results.specimens[0]!.assays) expect(text).toContain(a.name);
    expect(text).toContain(c.specimens[0]!.source);
    expect(text).toContain(transportConditionLabels[c.specimens[0]!.transportCondition]);
    // (c)(6) results with units; (d) reference intervals, each with its version
    expect(text).toContain('nmol/min/mg protein');
    const used = results.specimens[0]!.assays.flatMap((a) => [a.activity, a.ratioCs, a.ratioCii]).filter((x) => x?.interval);
    expect(used.length).toBeGreaterThan(10);
    for (const cmp of used) expect(text).toContain(`${cmp!.interval!.label}, interval version ${cmp!.interval!.version}`);
  });

  it('then the PDF carries the interpretation, the signer and the meaning of the signature, the status and version, and the caution', () => {
    expect(text).toContain(interpretation);
    expect(text).toContain('Dr Ilse Marchetti');
    expect(text).toContain('Reviewed and approved for release');
    expect(text).toContain('Version 1, final report');
    expect(text).toContain(collapse(reportCaution));
  });

  it('when the same case is signed again, then 409 and no second report exists', async () => {
    const res = await sign(c.id);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
    expect(await reportOf(c.id)).toHaveLength(1);
  });

  it('when the report row is altered directly in the database, then the database refuses it', async () => {
    const failure = async (sql: string, values: unknown[] = []) => {
      try {
        await t.sequelize.query(sql, { replacements: [...values, signed.id] });
        return 'no error';
      } catch (err) {
        const e = err as { parent?: Error; original?: Error; message: string };
        return (e.parent ?? e.original ?? e).message;
      }
    };
    expect(await failure("UPDATE reports SET interpretation = 'changed' WHERE id = ?")).toMatch(/cannot be changed/);
    expect(await failure('UPDATE reports SET pdf = ? WHERE id = ?', [Buffer.from([0])])).toMatch(/cannot be changed/);
    expect(await failure('DELETE FROM reports WHERE id = ?')).toMatch(/cannot be deleted/);
  });
});

describe('refused signatures write nothing', () => {
  let c: CaseDetail;
  beforeAll(async () => {
    c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
  });

  it('when the password is wrong, then 401 BAD_CREDENTIALS, the case still awaits review and no report or audit event is written', async () => {
    const reports = await countRows(t.sequelize, 'reports');
    const events = await countRows(t.sequelize, 'audit_events');
    const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: 'not-the-password' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('BAD_CREDENTIALS');
    expect((await tech.get(`/api/cases/${c.id}`)).body.state).toBe('awaiting_review');
    expect(await countRows(t.sequelize, 'reports')).toBe(reports);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(events);
    // The director's session survives a mistyped signing password.
    expect((await director.get('/api/auth/me')).status).toBe(200);
  });

  it('when a technologist tries to sign, then 403', async () => {
    const res = await tech.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('FORBIDDEN');
  });

  it('when the body lacks the password or carries an unknown field, then 400 names the field', async () => {
    const missing = await director.post(`/api/cases/${c.id}/sign`).send({});
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields).toHaveProperty('password');
    const unknown = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD, approve: true });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.fields).toHaveProperty('approve');
    const blankMeaning = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD, meaning: ' ' });
    expect(blankMeaning.status).toBe(400);
    expect(blankMeaning.body.error.fields).toHaveProperty('meaning');
  });

  it('when the director reviewed an older version of the case, then 409 STALE_VERSION', async () => {
    const res = await sign(c.id, { version: c.version - 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('STALE_VERSION');
  });

  it('when the case does not exist, then 404; when it is not awaiting review, then 409', async () => {
    expect((await sign(999999)).status).toBe(404);
    const created = await createCase(tech, { referringClinicianId: clinicianId });
    const res = await sign(created.id);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
  });
});

describe('corrected reports', () => {
  let c: CaseDetail;
  let v1: ReportDetail;
  let v1Bytes: Buffer;

  beforeAll(async () => {
    c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    v1 = (await sign(c.id)).body.report as ReportDetail;
    v1Bytes = (await binary(director.get(`/api/reports/${v1.id}/pdf`))).body as Buffer;
  });

  it('when a correction is issued, then version 2 says corrected, why, what changed and what it supersedes, and version 1 stays readable, marked superseded', async () => {
    const reason = 'The clinical indication was transcribed from the wrong request form (fixture).';
    const changes = 'Interpretation reworded; no result changed (fixture).';
    const res = await director.post(`/api/cases/${c.id}/correct`).send({
      password: DEMO_PASSWORD,
      reason,
      changesSummary: changes,
      interpretation: 'Corrected interpretation of the fixture case, version two.',
    });
    expect(res.status).toBe(201);
    const v2 = res.body.report as ReportDetail;
    expect(v2).toMatchObject({ version: 2, status: 'corrected', supersedesVersion: 1, correctionReason: reason, changesSummary: changes });
    expect((await tech.get(`/api/cases/${c.id}`)).body.state).toBe('corrected');

    const v2Text = await pdfText((await binary(clinician.get(`/api/reports/${v2.id}/pdf`))).body as Buffer);
    expect(v2Text).toMatch(/corrected/i);
    expect(v2Text).toContain(reason);
    expect(v2Text).toContain(changes);
    expect(v2Text).toContain('supersedes version 1');

    // CLIA 493.1291(k)(3): keep both the original and the corrected report.
    const list = (await clinician.get('/api/reports')).body as { id: number; status: string; version: number }[];
    expect(list.find((r) => r.id === v1.id)).toMatchObject({ status: 'superseded', version: 1 });
    expect(list.find((r) => r.id === v2.id)).toMatchObject({ status: 'corrected', version: 2 });
    const old = await binary(clinician.get(`/api/reports/${v1.id}/pdf`));
    expect(old.status).toBe(200);
    expect(sha256(old.body as Buffer)).toBe(sha256(v1Bytes));
    const detail = await clinician.get(`/api/reports/${v1.id}`);
    expect(detail.body).toMatchObject({ status: 'superseded', supersededByVersion: 2 });
  });

  it('when a corrected report is corrected again, then version 3 supersedes version 2', async () => {
    const res = await director
      .post(`/api/cases/${c.id}/correct`)
      .send({ password: DEMO_PASSWORD, reason: 'Second fixture correction.', changesSummary: 'Wording only (fixture).' });
    expect(res.status).toBe(201);
    expect(res.body.report).toMatchObject({ version: 3, status: 'corrected', supersedesVersion: 2 });
    const versions = await reportOf(c.id);
    expect(versions.map((r) => [r.version, r.status])).toEqual([
      [3, 'corrected'],
      [2, 'superseded'],
      [1, 'superseded'],
    ]);
  });

  it('when the reason or the password is missing or wrong, then nothing is issued', async () => {
    const before = (await reportOf(c.id)).length;
    const noReason = await director.post(`/api/cases/${c.id}/correct`).send({ password: DEMO_PASSWORD, changesSummary: 'x y z' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields).toHaveProperty('reason');
    const wrong = await director
      .post(`/api/cases/${c.id}/correct`)
      .send({ password: 'wrong-password', reason: 'Because.', changesSummary: 'Nothing.' });
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.code).toBe('BAD_CREDENTIALS');
    expect(await reportOf(c.id)).toHaveLength(before);
  });

  it('when a case awaiting review is "corrected", then 409: only a signed case gets a correction', async () => {
    const pending = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const res = await director.post(`/api/cases/${pending.id}/correct`).send({ password: DEMO_PASSWORD, reason: 'Fixture.', changesSummary: 'Fixture.' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
  });
});

describe('who reads which report', () => {
  let mine: ReportDetail;
  let theirs: ReportDetail;
  let unsigned: CaseDetail;

  beforeAll(async () => {
    const a = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    const b = await createCaseAwaitingReview(tech, { referringClinicianId: clinician2Id });
    unsigned = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId });
    mine = (await sign(a.id)).body.report as ReportDetail;
    theirs = (await sign(b.id)).body.report as ReportDetail;
  });

  it('GET /api/reports answers a bare array of exactly {id, caseId, accession, version, status, signedAt, signedBy}', async () => {
    const res = await clinician.get('/api/reports');
    expect(res.status).toBe(200);
    expect(Array.isArray(res.body)).toBe(true);
    for (const item of res.body as Record<string, unknown>[]) {
      expect(Object.keys(item).sort()).toEqual(['accession', 'caseId', 'id', 'signedAt', 'signedBy', 'status', 'version']);
      expect(() => reportListItemSchema.parse(item)).not.toThrow();
    }
  });

  it('when a clinician lists reports, then only cases they referred appear, and only signed versions', async () => {
    const list = (await clinician.get('/api/reports')).body as { id: number; caseId: number; status: string }[];
    expect(list.map((r) => r.id)).toContain(mine.id);
    expect(list.map((r) => r.id)).not.toContain(theirs.id);
    expect(list.map((r) => r.caseId)).not.toContain(unsigned.id);
    for (const r of list) {
      expect(['final', 'corrected', 'superseded']).toContain(r.status);
      const owner = (await tech.get(`/api/cases/${r.caseId}`)).body as CaseDetail;
      expect(owner.referringClinician.id).toBe(clinicianId);
    }
    const other = (await clinician2.get('/api/reports')).body as { id: number }[];
    expect(other.map((r) => r.id)).toContain(theirs.id);
    expect(other.map((r) => r.id)).not.toContain(mine.id);
  });

  it('when a clinician asks for another clinician’s report or its PDF, then 404, exactly as for a report that does not exist', async () => {
    const other = await clinician2.get(`/api/reports/${mine.id}`);
    const otherPdf = await clinician2.get(`/api/reports/${mine.id}/pdf`);
    const none = await clinician2.get('/api/reports/999999');
    for (const res of [other, otherPdf, none]) {
      expect(res.status).toBe(404);
      expect(res.body.error.code).toBe('NOT_FOUND');
    }
    expect(other.body.error.message.replace(String(mine.id), 'N')).toBe(none.body.error.message.replace('999999', 'N'));
    expect(JSON.stringify(otherPdf.body)).not.toContain(mine.accession);
  });

  it('when a clinician opens lab-only pages of a case, then the role table refuses them (no draft or result is reachable)', async () => {
    for (const path of [`/api/review/${unsigned.id}`, `/api/cases/${unsigned.id}/results`, `/api/cases/${unsigned.id}`, `/api/cases/${unsigned.id}/reports`]) {
      expect((await clinician.get(path)).status).toBe(403);
    }
  });

  it('when laboratory staff list reports, then they see every clinician’s; an administrator is refused', async () => {
    for (const agent of [tech, director]) {
      const ids = ((await agent.get('/api/reports')).body as { id: number }[]).map((r) => r.id);
      expect(ids).toEqual(expect.arrayContaining([mine.id, theirs.id]));
    }
    const res = await admin.get('/api/reports');
    expect(res.status).toBe(403);
    expect((await admin.get(`/api/reports/${mine.id}/pdf`)).status).toBe(403);
  });

  it('when a clinician asks for reports grouped by case, then each case lists its versions, newest first, only theirs', async () => {
    const res = await clinician.get('/api/reports/by-case');
    expect(res.status).toBe(200);
    const groups = res.body as { caseId: number; reports: { version: number }[] }[];
    expect(groups.map((g) => g.caseId)).toContain(mine.caseId);
    expect(groups.map((g) => g.caseId)).not.toContain(theirs.caseId);
    for (const g of groups) {
      const versions = g.reports.map((r) => r.version);
      expect(versions).toEqual([...versions].sort((x, y) => y - x));
    }
  });
});

describe('a case whose only specimen was rejected on receipt', () => {
  it('when it is submitted and signed, then the report states the rejection and its reason, and no results', async () => {
    // CLIA 42 CFR 493.1291(c)(7) [confirmed]: the report shows the condition and disposition of a specimen that
    // did not meet the laboratory's criteria for acceptability.
    const c = await createCase(tech, {
      specimen: buildSpecimenInput({ accepted: false, rejectionReason: 'Thawed in transit', transportCondition: 'thawed' }),
    });
    expect(c.state).toBe('received');
    const submitted = await tech.post(`/api/cases/${c.id}/submit`).send({ version: c.version });
    expect(submitted.status).toBe(200);
    expect(submitted.body.state).toBe('awaiting_review');
    const signed = await sign(c.id);
    expect(signed.status).toBe(201);
    const [report] = await reportOf(c.id);
    const text = await pdfText((await binary(tech.get(`/api/reports/${report!.id}/pdf`))).body as Buffer);
    expect(text).toContain('Thawed in transit');
    expect(text).toMatch(/not performed/i);
    expect(text).not.toContain('Ratio to CS');
  });

  it('when a received case still has an accepted specimen without results, then submission is refused (409)', async () => {
    const c = await createCase(tech);
    const res = await tech.post(`/api/cases/${c.id}/submit`).send({ version: c.version });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('INVALID_STATE');
  });
});

/*
 * A case with several specimens: the report prints every specimen, each result under its own specimen with the
 * specimen's source, and the condition and disposition of a rejected one (US CLIA 42 CFR 493.1291(c)(5), (6),
 * (7) [confirmed], docs/domain.md §5).
 */

/**
 * Records the protein and one rate per assay for one specimen, worked back from the wanted activity with the
 * Beer–Lambert relation of docs/domain.md §1 [derived], as tests/factories/workup.ts does for the first specimen.
 */
async function enterAssays(caseId: number, specimen: Specimen, activities: Record<AssayCode, number>): Promise<void> {
  const conditions = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 20 };
  const protein = 2;
  const p = await tech
    .put(`/api/specimens/${specimen.id}/protein`)
    .send({ kind: 'direct', proteinMgPerMl: protein, proteinSource: 'BCA assay (fixture)', version: specimen.version });
  expect(p.status).toBe(200);
  const defs = ((await tech.get('/api/assay-definitions')).body.items as unknown[]).map(
    (d) => storedAssayDefinitionSchema.parse(d).definition,
  );
  for (const def of defs) {
    const slope =
      (activities[def.code] * def.epsilonPerMmPerCm * conditions.pathlengthCm * conditions.sampleVolumeUl * protein) /
      (conditions.reactionVolumeUl * 1000);
    const res = await tech.post(`/api/cases/${caseId}/measurements`).send({
      specimenId: specimen.id,
      assay: def.code,
      replicate: 1,
      mode: 'rates',
      ...conditions,
      totalRatePerMin: def.direction === 'rises' ? slope : -slope,
      backgroundRatePerMin: def.background === 'none' ? null : 0,
    });
    expect(res.status, `measurement ${def.code}`).toBe(201);
  }
}

async function addSpecimen(caseId: number, input: Parameters<typeof buildSpecimenInput>[0]): Promise<Specimen> {
  const res = await tech.post(`/api/cases/${caseId}/specimens`).send(buildSpecimenInput(input));
  expect(res.status).toBe(201);
  return res.body as Specimen;
}

async function submitAndSign(caseId: number): Promise<{ report: ReportDetail; text: string }> {
  const current = await tech.get(`/api/cases/${caseId}`);
  expect((await tech.post(`/api/cases/${caseId}/submit`).send({ version: current.body.version })).status).toBe(200);
  expect((await sign(caseId)).status).toBe(201);
  const [report] = await reportOf(caseId);
  const text = await pdfText((await binary(tech.get(`/api/reports/${report!.id}/pdf`))).body as Buffer);
  return { report: report!, text };
}

/** The text from `from` up to `to` (exclusive); fails when either is missing or out of order. */
function between(text: string, from: string, to: string): string {
  const start = text.indexOf(from);
  const end = text.indexOf(to, start + from.length);
  expect(start, from).toBeGreaterThanOrEqual(0);
  expect(end, to).toBeGreaterThan(start);
  return text.slice(start, end);
}

describe('a case with several specimens', () => {
  it('when muscle and liver both have results, then the signed PDF prints each specimen with its own source and results (CLIA 493.1291(c)(5),(6) [confirmed])', async () => {
    const c = await createCase(tech, {
      referringClinicianId: clinicianId,
      specimen: buildSpecimenInput({ source: 'Vastus lateralis, fixture muscle MX-7' }),
    });
    const liver = await addSpecimen(c.id, { type: 'liver', source: 'Liver, fixture wedge LV-3', transportCondition: 'liquid_nitrogen', wetWeightMg: 30 });
    await enterAssays(c.id, c.specimens[0]!, isolatedComplexI);
    await enterAssays(c.id, liver, nearMeans);
    const results = (await tech.get(`/api/cases/${c.id}/results`)).body as CaseResults;
    const { report, text } = await submitAndSign(c.id);

    expect(report.specimenType).toBe('skeletal_muscle');
    expect(text).not.toContain('not part of this report');
    const a = between(text, 'Specimen A \u2014 Skeletal muscle', 'Specimen B \u2014 Liver');
    const b = between(text, 'Specimen B \u2014 Liver', 'Interpretation');
    expect(a).toContain('Vastus lateralis, fixture muscle MX-7');
    expect(a).toContain(transportConditionLabels.dry_ice);
    expect(b).toContain('Liver, fixture wedge LV-3');
    expect(b).toContain(transportConditionLabels.liquid_nitrogen);
    // Each section has its own results table and graphic: every assay of that specimen, with its units.
    for (const [section, specimenResults] of [
      [a, results.specimens.find((s) => s.specimenId === c.specimens[0]!.id)],
      [b, results.specimens.find((s) => s.specimenId === liver.id)],
    ] as const) {
      const assays = specimenResults?.assays ?? [];
      expect(assays.length).toBeGreaterThan(0);
      // One activity row per assay, each printed with its unit (the unit comes from the results API).
      const units = section.split(assays[0]!.unit).length - 1;
      expect(units).toBe(assays.filter((x) => x.activity.value !== null).length);
      for (const assay of assays) expect(section).toContain(assay.assay);
    }
    // The CI activity typed for each specimen (6 in muscle, 37 in liver; invented fixtures, rates worked back with
    // Beer–Lambert [derived]) is printed in its own specimen's section only.
    const ciMuscle = /Activity 6(\.0+)? nmol\/min\/mg protein/;
    const ciLiver = /Activity 37(\.0+)? nmol\/min\/mg protein/;
    expect(isolatedComplexI.CI).toBe(6);
    expect(nearMeans.CI).toBe(37);
    expect(a).toMatch(ciMuscle);
    expect(a).not.toMatch(ciLiver);
    expect(b).toMatch(ciLiver);
    expect(b).not.toMatch(ciMuscle);
  });

  it('when specimen A was rejected and B accepted, then the PDF states A\u2019s rejection reason and disposition and B\u2019s results (CLIA 493.1291(c)(5),(6),(7) [confirmed])', async () => {
    const c = await createCase(tech, {
      referringClinicianId: clinicianId,
      specimen: buildSpecimenInput({ accepted: false, rejectionReason: 'Fixture reason RJ-22: container cracked', transportCondition: 'thawed' }),
    });
    const b = await addSpecimen(c.id, { source: 'Vastus lateralis, fixture repeat biopsy RB-9' });
    await enterAssays(c.id, b, isolatedComplexI);
    const { report, text } = await submitAndSign(c.id);

    expect(report.specimenType).toBe('skeletal_muscle');
    const aText = between(text, 'Specimen A \u2014 Skeletal muscle', 'Specimen B \u2014 Skeletal muscle');
    expect(aText).toContain('Fixture reason RJ-22: container cracked');
    expect(aText).toMatch(/Disposition\s*Not analysed/);
    expect(aText).toMatch(/not performed/i);
    expect(aText).not.toContain('Ratio to CS');
    const bText = between(text, 'Specimen B \u2014 Skeletal muscle', 'Interpretation');
    expect(bText).toContain('Vastus lateralis, fixture repeat biopsy RB-9');
    expect(bText).toContain('Ratio to CS');
    expect(bText).toContain('nmol/min/mg protein');
  });
});
