import { parse } from 'csv-parse/sync';
import type request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseDetail } from '@/schemas/case';
import type { ReportDetail, ReportListItem } from '@/schemas/report';
import { buildSpecimenInput, createCase } from '../factories/cases';
import { accountId, createCaseAwaitingReview, nearMeans } from '../factories/workup';
import { binary } from '../setup/binary-body';
import { DEMO_PASSWORD, countRows, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * GET /api/registry/export.csv against the rules it must keep, read back with csv-parse (an independent CSV
 * reader from npm), never with Cristae's writer:
 * - HIPAA Safe Harbor, 45 CFR 164.514(b)(2) [confirmed, docs/domain.md §5b]: no names, no record or account
 *   numbers (lab patient IDs, accession numbers), no date element finer than the year, ages over 89 as one
 *   group "90+"; (c) a re-identification code may be kept only when it is not derived from the person's data.
 * - RFC 4180 [confirmed as the standard]: header line, quoted fields holding commas, CRLF line breaks.
 * - OWASP "CSV Injection" [common practice]: a cell starting with = + - @ is prefixed so no spreadsheet runs it.
 * - Issue 13: directors only (others 403); same filters as the cohort search; every export audited.
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
/** A parsed CSV record: the columns the checks read (present in one export or the other), and the rest. */
type Row = {
  accession: string;
  lab_patient_id: string;
  patient_name: string;
  collected_on: string;
  specimen_label: string;
  study_id: string;
  sex: string;
  age_at_collection_years: string;
  collection_year: string;
  report_year: string;
  pattern: string;
  [column: string]: string;
};

let t: TestApp;
let director: Agent;
let tech: Agent;
let clinician: Agent;
let admin: Agent;
/** The cases this file signs: a patient 89 at collection, one past 90 with two cases, one rejected specimen. */
const made: { eightyNine?: CaseDetail; ninety: CaseDetail[]; rejected?: CaseDetail } = { ninety: [] };

/** A date of birth `years` years and `days` days before today (UTC), so the age at collection is known. */
function bornYearsAgo(years: number, days: number): string {
  const d = new Date();
  d.setUTCFullYear(d.getUTCFullYear() - years);
  d.setUTCDate(d.getUTCDate() - days);
  return d.toISOString().slice(0, 10);
}

async function signedCase(overrides: Record<string, unknown>): Promise<CaseDetail> {
  const clinicianId = await accountId(admin, 'clinician@demo.test');
  const c = await createCaseAwaitingReview(tech, { referringClinicianId: clinicianId, activities: nearMeans, overrides });
  const res = await director.post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD });
  if (res.status !== 201) throw new Error(`sign: ${res.status} ${JSON.stringify(res.body)}`);
  return c;
}

beforeAll(async () => {
  t = await makeTestApp();
  [director, tech, clinician, admin] = await Promise.all([
    t.signedIn('director'),
    t.signedIn('technologist'),
    t.signedIn('clinician'),
    t.signedIn('admin'),
  ]);
  made.eightyNine = await signedCase({ patient: { dateOfBirth: bornYearsAgo(89, 10), familyName: 'Brackenridge', givenName: 'Ottoline' } });
  // A name that a spreadsheet would read as a formula, with letters beyond ASCII.
  const first = await signedCase({ patient: { dateOfBirth: bornYearsAgo(90, 10), familyName: '=Øverholt+1', givenName: 'Ågot Żaneta' } });
  made.ninety.push(first, await signedCase({ patientId: first.patient.id }));
  // Signed with its only specimen rejected on receipt: on the report, but with no results for the cohort tables.
  const rejected = await createCase(tech, {
    specimen: buildSpecimenInput({ accepted: false, rejectionReason: 'Thawed in transit', transportCondition: 'thawed' }),
  });
  expect((await tech.post(`/api/cases/${rejected.id}/submit`).send({ version: rejected.version })).status).toBe(200);
  expect((await director.post(`/api/cases/${rejected.id}/sign`).send({ password: DEMO_PASSWORD })).status).toBe(201);
  made.rejected = rejected;
}, 240_000);
afterAll(() => t.close());

/** The export as raw text (UTF-8 decoded here) and as records. */
async function exportCsv(agent: Agent, query: string): Promise<{ res: request.Response; text: string; header: string[]; rows: Row[] }> {
  const res = await binary(agent.get(`/api/registry/export.csv${query}`));
  const text = Buffer.isBuffer(res.body) ? new TextDecoder('utf-8', { fatal: true }).decode(res.body) : '';
  if (res.status !== 200) return { res, text, header: [], rows: [] };
  const records = parse(text, { relax_column_count: false }) as string[][];
  const [header, ...body] = records;
  return { res, text, header: header!, rows: body.map((cells) => Object.fromEntries(header!.map((h, i) => [h, cells[i]!])) as Row) };
}

async function currentReports(): Promise<ReportDetail[]> {
  const list = (await director.get('/api/reports')).body as ReportListItem[];
  const current = list.filter((r) => r.status !== 'superseded');
  return Promise.all(current.map(async (r) => (await director.get(`/api/reports/${r.id}`)).body as ReportDetail));
}

describe('GET /api/registry/export.csv: who may export', () => {
  it('when a director asks, then 200 text/csv; technologists, clinicians and administrators get 403; nobody signed in 401', async () => {
    for (const q of ['?deidentified=true', '']) {
      const ok = await exportCsv(director, q);
      expect(ok.res.status).toBe(200);
      expect(ok.res.headers['content-type']).toMatch(/^text\/csv; charset=utf-8/);
      for (const agent of [tech, clinician, admin]) {
        const res = await agent.get(`/api/registry/export.csv${q}`);
        expect(res.status).toBe(403);
        expect(res.body.error.code).toBe('FORBIDDEN');
      }
      expect((await t.agent().get(`/api/registry/export.csv${q}`)).status).toBe(401);
    }
  });

  it('when a filter is not valid, then 400 names the field and no export is audited', async () => {
    const before = await countRows(t.sequelize, 'audit_events');
    const bad = await director.get('/api/registry/export.csv?deidentified=yes&ageBand=ancient');
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['deidentified', 'ageBand']));
    const range = await director.get('/api/registry/export.csv?range=CI:ratio_cs:pct:50:10');
    expect(range.status).toBe(400);
    expect(JSON.stringify(range.body.error.fields)).toMatch(/range/);
    expect(await countRows(t.sequelize, 'audit_events')).toBe(before);
  });
});

describe('GET /api/registry/export.csv: rows', () => {
  it('when exported without filters, then there is a header and a row for every specimen of every case with a signed report', async () => {
    const reports = await currentReports();
    const { header, rows } = await exportCsv(director, '');
    expect(header).toEqual(expect.arrayContaining(['accession', 'lab_patient_id', 'specimen_type']));
    expect(new Set(rows.map((r) => r.accession))).toEqual(new Set(reports.map((r) => r.accession)));
    const deid = await exportCsv(director, '?deidentified=true');
    expect(deid.rows).toHaveLength(rows.length);
    expect(deid.rows.length).toBeGreaterThanOrEqual(reports.length);
  });

  it('when a signed case\'s only specimen was rejected, then it still has its row, marked not accepted and without results', async () => {
    const { header, rows } = await exportCsv(director, '');
    const row = rows.find((r) => r.accession === made.rejected!.accession)!;
    expect(row.specimen_accepted).toBe('no');
    for (const column of header.filter((h) => /^C.*(activity|ratio)/.test(h))) expect(row[column], column).toBe('');
    // Criteria about results never select it; criteria about the specimen or patient do.
    expect((await exportCsv(director, '?pattern=normal')).rows.map((r) => r.accession)).not.toContain(made.rejected!.accession);
    expect((await exportCsv(director, '?specimenType=skeletal_muscle')).rows.map((r) => r.accession)).toContain(made.rejected!.accession);
    expect((await exportCsv(director, '?specimenType=liver')).rows.map((r) => r.accession)).not.toContain(made.rejected!.accession);
  });

  it('when filtered as the cohort search is, then the export holds exactly the cohort search\'s members', async () => {
    for (const q of ['range=CI:ratio_cs:pct:80:', 'complex=CI', 'pattern=normal&ageBand=65_plus']) {
      const cohort = await director.get(`/api/registry/cohort?${q}&pageSize=200`);
      expect(cohort.status).toBe(200);
      expect(cohort.body.total, q).toBeGreaterThan(0);
      const { rows } = await exportCsv(director, `?${q}`);
      expect(rows.length, q).toBe(cohort.body.total);
      const members = (cohort.body.items as { accession: string; specimenLabel: string }[]).map((m) => `${m.accession}/${m.specimenLabel}`);
      expect(rows.map((r) => `${r.accession}/${r.specimen_label}`).sort(), q).toEqual(members.sort());
    }
    // The two cases of the patient past 90 and the one of 89 are among the 65-and-over normal results.
    const { rows } = await exportCsv(director, '?pattern=normal&ageBand=65_plus');
    const ours = [made.eightyNine!, ...made.ninety].map((c) => c.accession);
    expect(rows.map((r) => r.accession)).toEqual(expect.arrayContaining(ours));
  });

  it('when a cell would start a spreadsheet formula or holds a comma or letters beyond ASCII, then it is prefixed, quoted and UTF-8 (OWASP; RFC 4180)', async () => {
    const { text, rows } = await exportCsv(director, '');
    const row = rows.find((r) => r.accession === made.ninety[0]!.accession)!;
    expect(row.patient_name).toBe("'=Øverholt+1, Ågot Żaneta");
    expect(text).toContain('"\'=Øverholt+1, Ågot Żaneta"');
    expect(text.split('\r\n').length).toBeGreaterThan(rows.length);
  });
});

describe('GET /api/registry/export.csv?deidentified=true: HIPAA Safe Harbor', () => {
  it('when de-identified, then no cell holds a name, lab ID, accession, date of birth, free text or a date finer than the year', async () => {
    const reports = await currentReports();
    const identified = await exportCsv(director, '');
    const { header, rows } = await exportCsv(director, '?deidentified=true');
    const forbidden = new Set<string>();
    for (const r of reports) {
      forbidden.add(r.accession);
      forbidden.add(r.labPatientId);
      forbidden.add(r.dateOfBirth);
      for (const part of r.patientName.split(/[,\s]+/)) if (part.length > 2) forbidden.add(part.toLowerCase());
      forbidden.add(r.interpretation.slice(0, 30).toLowerCase());
    }
    for (const r of identified.rows) forbidden.add(r.collected_on);
    expect(forbidden.size).toBeGreaterThan(10);
    expect(header.join(',')).not.toMatch(/name|lab_patient|accession|birth|label|_on\b|date/i);
    for (const row of rows) {
      for (const [column, cell] of Object.entries(row)) {
        const lower = cell.toLowerCase();
        for (const f of forbidden) expect(lower.includes(f.toLowerCase()), `${column}=${cell} holds ${f}`).toBe(false);
        // No date element but the year: no YYYY-MM(-DD), DD/MM/YYYY or time of day anywhere.
        expect(cell, column).not.toMatch(/\d{4}-\d{2}|\d{1,2}[/.]\d{1,2}[/.]\d{2,4}|\d{2}:\d{2}/);
      }
      // Only codes and numbers: an allow-list per column leaves no room for free text.
      expect(row.study_id).toMatch(/^ST-[0-9A-F]{10}$/);
      expect(['female', 'male', 'other', 'unknown']).toContain(row.sex);
      expect(row.age_at_collection_years).toMatch(/^(\d{1,2}|90\+)?$/);
      expect(row.collection_year).toMatch(/^\d{4}$/);
      expect(row.report_year).toMatch(/^\d{4}$/);
      // Pattern codes such as "combined:CI,CIV" or "isolated:CI+raised_cs": letters and : , + only, no spaces.
      expect(row.pattern).toMatch(/^[a-zA-Z_:+,]*$/);
      for (const [column, cell] of Object.entries(row)) {
        if (/^C.*(activity|ratio)/.test(column)) expect(cell, column).toMatch(/^(-?\d+(\.\d+)?(e-?\d+)?)?$/);
      }
    }
  });

  it('when a patient is over 89 at collection, then the age is "90+"; at 89 it stays 89 (Safe Harbor (b)(2)(i)(C))', async () => {
    const identified = await exportCsv(director, '');
    const deid = await exportCsv(director, '?deidentified=true');
    // Both exports list the same specimens in the same order; the identified one tells which row is whose.
    const ageOf = (accession: string) => deid.rows[identified.rows.findIndex((r) => r.accession === accession)]!.age_at_collection_years;
    expect(ageOf(made.eightyNine!.accession)).toBe('89');
    for (const c of made.ninety) expect(ageOf(c.accession)).toBe('90+');
    expect(Number(identified.rows.find((r) => r.accession === made.ninety[0]!.accession)!.age_at_collection_years)).toBe(90);
    for (const r of deid.rows) if (r.age_at_collection_years !== '90+' && r.age_at_collection_years !== '') expect(Number(r.age_at_collection_years)).toBeLessThanOrEqual(89);
  });

  it('when exported twice at once, then study IDs are one per patient within an export, new in every export, and never a lab ID; both exports are audited', async () => {
    const identified = await exportCsv(director, '');
    const [a, b] = await Promise.all([exportCsv(director, '?deidentified=true'), exportCsv(director, '?deidentified=true')]);
    expect(a.rows).toHaveLength(identified.rows.length);
    for (const one of [a, b]) {
      const byLabId = new Map<string, string>();
      const byStudyId = new Map<string, string>();
      identified.rows.forEach((r, i) => {
        const study = one.rows[i]!.study_id;
        expect(study).not.toBe(r.lab_patient_id);
        expect(study.includes(r.lab_patient_id)).toBe(false);
        // Same patient ⇔ same study ID.
        expect(byLabId.get(r.lab_patient_id) ?? study).toBe(study);
        expect(byStudyId.get(study) ?? r.lab_patient_id).toBe(r.lab_patient_id);
        byLabId.set(r.lab_patient_id, study);
        byStudyId.set(study, r.lab_patient_id);
      });
      // The patient past 90 has two cases, hence two rows under one study ID.
      const theirs = one.rows.filter((_, i) => identified.rows[i]!.accession.match(new RegExp(made.ninety.map((c) => c.accession).join('|'))));
      expect(theirs).toHaveLength(2);
      expect(theirs[0]!.study_id).toBe(theirs[1]!.study_id);
    }
    const studyA = new Set(a.rows.map((r) => r.study_id));
    for (const r of b.rows) expect(studyA.has(r.study_id)).toBe(false);
  });

  it('when a director exports with filters, then the audit trail records who, when, the filters and the row count', async () => {
    const started = new Date(Date.now() - 1000).toISOString();
    const { rows } = await exportCsv(director, '?deidentified=true&specimenType=skeletal_muscle&sex=male');
    const audit = await director.get('/api/audit?entity=registry-export');
    expect(audit.status).toBe(200);
    const event = (audit.body.items as Array<{ at: string; actorEmail: string; action: string; after: Record<string, unknown> }>)[0]!;
    expect(event.actorEmail).toBe('director@demo.test');
    expect(event.action).toBe('export');
    expect(event.at >= started).toBe(true);
    expect(event.after).toEqual({ deidentified: true, filters: { specimenType: 'skeletal_muscle', sex: 'male' }, rows: rows.length });
  });
});
