import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { assayCodes, measures, specimenTypeLabels, specimenTypes, type AssayCode, type Measure } from '@/schemas/common';
import { reportCaution } from '@/schemas/report-document';
import {
  CRISTAE_SYSTEMS,
  HL7,
  interpretationCoding,
  measureCoding,
  measureText,
  specimenTypeCoding,
  ucumCodeOf,
} from '../../../../server/domain/fhir-report/codes';
import { NO_INTERVAL, PDF, bundleOf, withResult, type Bundle, type Json, type Resource } from '../../../factories/fhir-bundles';
import {
  buildCorrectedReportDocument,
  buildRejectedReportDocument,
  buildReportDocument,
  buildTwoSpecimenReportDocument,
} from '../../../factories/report-document';

/*
 * The FHIR bundle of one report version, built in memory (no server), checked against the standards, never
 * against Cristae's own code:
 * - HL7 FHIR R4 (hl7.org/fhir/R4) [confirmed as the standard]: the code-system URLs and codes below are those the
 *   R4 specification publishes (terminology.hl7.org CodeSystems observation-category, v2-0074,
 *   v3-ObservationInterpretation, data-absent-reason), and the element names those of the R4 resources. The same
 *   variant bundles also go through the R4 JSON schema, FHIR.js and the UCUM library in
 *   tests/api/fhir-conformance.api.test.ts (kept there because those validators take seconds to load, too slow for
 *   a mutation run that repeats this file for every mutant).
 * - XML 1.0 §2.4 [confirmed]: "<" and "&" in character data are written as &lt; and &amp;.
 * - RFC 9562 §5.5 (name-based UUID, version 5, SHA-1) and RFC 4122 Appendix C's URL namespace
 *   6ba7b811-9dad-11d1-80b4-00c04fd430c8 [confirmed as the standard], computed here with node:crypto.
 * - RFC 2606 reserves `.example` for documentation [confirmed]: Cristae's own systems live under it.
 * - The contract in docs/api.md (GET /api/reports/:id/fhir): codes `CI.activity`, `CIV.ratio-to-CS`,
 *   `CI.ratio-to-CII`; UCUM `nmol/min/mg`, `1`, `mL/min/mg`, `%`.
 * Every document is invented (tests/factories/report-document.ts): a fictitious laboratory and people.
 */

const resources = (b: Bundle, type: string): Resource[] => b.entry.map((e) => e.resource).filter((r) => r.resourceType === type);
const one = (b: Bundle, type: string): Resource => {
  const list = resources(b, type);
  expect(list).toHaveLength(1);
  return list[0]!;
};
const observationFor = (b: Bundle, code: string): Resource => {
  const found = resources(b, 'Observation').filter((o) => o.code?.coding[0]?.code === code);
  expect(found, code).toHaveLength(1);
  return found[0]!;
};

/** RFC 9562 §5.5: SHA-1 of namespace bytes then name, version 5 in the high nibble of octet 6, variant 10 in octet 8. */
function uuidV5ByRfc(name: string, namespace: string): string {
  const ns = Buffer.from(namespace.replace(/-/g, ''), 'hex');
  const hash = createHash('sha1').update(Buffer.concat([ns, Buffer.from(name, 'utf8')])).digest();
  const b = hash.subarray(0, 16);
  b[6] = (b[6]! & 0x0f) | 0x50;
  b[8] = (b[8]! & 0x3f) | 0x80;
  const h = b.toString('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}
const URL_NAMESPACE = '6ba7b811-9dad-11d1-80b4-00c04fd430c8';

describe('codes.ts: the code systems against the standards', () => {
  it('names the HL7 code systems by the canonical URLs FHIR R4 publishes [confirmed as the standard]', () => {
    expect(HL7).toEqual({
      ucum: 'http://unitsofmeasure.org',
      interpretation: 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation',
      observationCategory: 'http://terminology.hl7.org/CodeSystem/observation-category',
      diagnosticServiceSection: 'http://terminology.hl7.org/CodeSystem/v2-0074',
      dataAbsentReason: 'http://terminology.hl7.org/CodeSystem/data-absent-reason',
      referenceRangeMeaning: 'http://terminology.hl7.org/CodeSystem/referencerange-meaning',
    });
  });

  it("keeps Cristae's own systems under the reserved .example domain, each a distinct https URL (RFC 2606 [confirmed])", () => {
    const urls = Object.values(CRISTAE_SYSTEMS);
    expect(urls).toHaveLength(8);
    for (const u of urls) {
      const parsed = new URL(u);
      expect(parsed.protocol).toBe('https:');
      expect(parsed.hostname.endsWith('.example')).toBe(true);
      // A CodeSystem for codes, a NamingSystem for identifiers (the R4 resource names) [confirmed as the standard].
      expect(parsed.pathname).toMatch(/^\/fhir\/(CodeSystem|NamingSystem)\/[a-z][a-z-]+[a-z]$/);
    }
    expect(new Set(urls).size).toBe(urls.length);
    for (const k of ['measures', 'panels', 'specimenTypes'] as const) expect(CRISTAE_SYSTEMS[k]).toContain('/CodeSystem/');
    for (const k of ['labPatientId', 'accession', 'reportVersion', 'specimen', 'accreditation'] as const) {
      expect(CRISTAE_SYSTEMS[k]).toContain('/NamingSystem/');
    }
  });

  it('gives every assay × measure its own code as docs/api.md writes them, and a display naming the enzyme in its usual name', () => {
    // docs/api.md: `CI.activity`, `CIV.ratio-to-CS`, `CI.ratio-to-CII`.
    expect(measureCoding('CI', 'activity').code).toBe('CI.activity');
    expect(measureCoding('CIV', 'ratio_cs').code).toBe('CIV.ratio-to-CS');
    expect(measureCoding('CI', 'ratio_cii').code).toBe('CI.ratio-to-CII');
    // The respiratory-chain complexes by their Roman numerals and citrate synthase, the names the trade uses
    // [common practice].
    const enzyme: Record<AssayCode, string> = {
      CI: 'Complex I ',
      CII: 'Complex II ',
      CIII: 'Complex III ',
      CIV: 'Complex IV ',
      'CI+III': 'Complex I+III ',
      'CII+III': 'Complex II+III ',
      CS: 'Citrate synthase ',
    };
    const measureWords: Record<Measure, RegExp> = {
      activity: /activity$/,
      ratio_cs: /ratio to citrate synthase$/,
      ratio_cii: /ratio to complex II$/,
    };
    const codes = new Set<string>();
    for (const assay of assayCodes) {
      for (const measure of measures) {
        const c = measureCoding(assay, measure);
        expect(c.system).toBe(CRISTAE_SYSTEMS.measures);
        expect(c.code.startsWith(`${assay}.`)).toBe(true);
        expect(c.display.startsWith(enzyme[assay]), c.display).toBe(true);
        expect(c.display).toMatch(measureWords[measure]);
        codes.add(c.code);
      }
    }
    expect(codes.size).toBe(assayCodes.length * measures.length);
    expect(measureText('NADH:ubiquinone oxidoreductase', 'ratio_cs')).toBe(
      'NADH:ubiquinone oxidoreductase: activity ratio to citrate synthase',
    );
  });

  it('codes a specimen type with its printed label', () => {
    for (const type of specimenTypes) {
      expect(specimenTypeCoding(type)).toEqual({ system: CRISTAE_SYSTEMS.specimenTypes, code: type, display: specimenTypeLabels[type] });
    }
  });

  it('maps L, N and H as HL7 v3 ObservationInterpretation defines them, and nothing for a value not compared [confirmed as the standard]', () => {
    const system = 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation';
    expect(interpretationCoding('below')).toEqual({ system, code: 'L', display: 'Low' });
    expect(interpretationCoding('within')).toEqual({ system, code: 'N', display: 'Normal' });
    expect(interpretationCoding('above')).toEqual({ system, code: 'H', display: 'High' });
    expect(interpretationCoding('not_compared')).toBeNull();
  });

  it('gives each printed unit the UCUM code docs/api.md names (UCUM has no words in codes, a ratio is the unity "1")', () => {
    // The UCUM library's check of these codes is in tests/api/fhir-conformance.api.test.ts.
    const cases: Array<[string, string]> = [
      ['nmol/min/mg protein', 'nmol/min/mg'],
      ['nmol/min/mg', 'nmol/min/mg'],
      ['  nmol/min/mg protein  ', 'nmol/min/mg'],
      ['mL·min⁻¹·mg⁻¹', 'mL/min/mg'],
      ['mL·min⁻¹·mg⁻¹ protein', 'mL/min/mg'],
      ['ratio', '1'],
      [' ratio ', '1'],
    ];
    for (const [printed, code] of cases) expect(ucumCodeOf(printed), printed).toBe(code);
  });

  it('gives no UCUM code for a unit it does not know or one that only resembles a known one', () => {
    for (const printed of [
      'U/L',
      'µmol/min/g',
      'nmol/min/mg proteins',
      'nmol/min/mg tissue',
      'pnmol/min/mg',
      'nmol/min/mgX',
      'xmL·min⁻¹·mg⁻¹',
      'ratios',
      'a ratio',
      '',
    ]) {
      expect(ucumCodeOf(printed), printed).toBeNull();
    }
  });
});

describe('buildReportBundle: the demo final report', () => {
  const doc = buildReportDocument({ laboratory: { phone: '+00 0000 000000 (demo)' } });
  // Built in beforeAll, not while the file is collected: a throw there fails the tests instead of leaving the file
  // with no tests at all (which a mutation run would count as a surviving mutant).
  let bundle: Bundle;
  beforeAll(() => {
    bundle = bundleOf(doc);
  });

  it('is a collection headed by its DiagnosticReport, identified by accession and version, stamped at signing', () => {
    expect(bundle.resourceType).toBe('Bundle');
    expect(bundle.type).toBe('collection');
    expect(bundle.entry[0]!.resource.resourceType).toBe('DiagnosticReport');
    expect(bundle.identifier).toEqual({ system: CRISTAE_SYSTEMS.reportVersion, value: 'DEMO-25-0142/v1' });
    expect(bundle.timestamp).toBe('2025-03-14T09:30:00Z');
    const types = bundle.entry.map((e) => e.resource.resourceType).sort();
    expect(types.filter((t) => t !== 'Observation')).toEqual(['DiagnosticReport', 'Organization', 'Patient', 'Practitioner', 'Specimen']);
    expect(resources(bundle, 'Observation')).toHaveLength(doc.specimens[0]!.results.length);
  });

  it('names every resource by the RFC 9562 version-5 UUID of the report id and its place, in the URL-derived namespace', () => {
    const namespace = uuidV5ByRfc('https://cristae.example/fhir', URL_NAMESPACE);
    const expected = (what: string) => uuidV5ByRfc(`report/42/${what}`, namespace);
    expect(bundle.id).toBe(expected('bundle'));
    const byType = (t: string) => one(bundle, t).id;
    expect(byType('Patient')).toBe(expected('patient'));
    expect(byType('Organization')).toBe(expected('laboratory'));
    expect(byType('Practitioner')).toBe(expected('signer'));
    expect(byType('DiagnosticReport')).toBe(expected('diagnostic-report'));
    expect(byType('Specimen')).toBe(expected('specimen/0'));
    expect(observationFor(bundle, 'CIV.ratio-to-CS').id).toBe(expected('specimen/0/CIV/ratio_cs'));
    for (const e of bundle.entry) expect(e.fullUrl).toBe(`urn:uuid:${e.resource.id}`);
    // Another report id gives other ids; the same one the same bundle.
    expect(bundleOf(doc, null, 43).id).not.toBe(bundle.id);
    expect(bundleOf(doc)).toEqual(bundle);
  });

  it('carries the patient with family and given names split at the comma, the lab patient id, sex and birth date', () => {
    const named = bundleOf(buildReportDocument({ patient: { name: 'Quillfeather, Marigold  Anne' } }));
    const patient = one(named, 'Patient');
    // HumanName.family and HumanName.given (R4 datatypes) [confirmed as the standard].
    expect(patient.name).toEqual([{ text: 'Quillfeather, Marigold  Anne', family: 'Quillfeather', given: ['Marigold', 'Anne'] }]);
    expect(patient.identifier).toEqual([{ system: CRISTAE_SYSTEMS.labPatientId, value: 'DEMO-P-004217' }]);
    expect(patient.gender).toBe('female');
    expect(patient.birthDate).toBe('2016-08-09');
    // Without a comma, or with nothing before it, the name stays whole in `text`.
    expect(one(bundle, 'Patient').name).toEqual([{ text: 'Robin Testperson (demo)' }]);
    expect(one(bundleOf(buildReportDocument({ patient: { name: ',Marigold' } })), 'Patient').name).toEqual([{ text: ',Marigold' }]);
    // A family name alone: no empty `given` (R4 forbids empty arrays).
    const family = bundleOf(buildReportDocument({ patient: { name: 'Quillfeather,  ' } }));
    expect(one(family, 'Patient').name).toEqual([{ text: 'Quillfeather,', family: 'Quillfeather' }]);
  });

  it('carries the laboratory with its accreditation number, telephone and address lines, and the signer by name', () => {
    const org = one(bundle, 'Organization');
    expect(org.identifier).toEqual([{ system: CRISTAE_SYSTEMS.accreditation, value: 'DEMO-ACC-0000' }]);
    expect(org.name).toBe('Example Metabolic Laboratory (demo)');
    expect(org.telecom).toEqual([{ system: 'phone', value: '+00 0000 000000 (demo)' }]);
    expect(org.address).toEqual([{ line: doc.laboratory.addressLines }]);
    expect(one(bundleOf(buildReportDocument()), 'Organization').telecom).toBeUndefined();
    expect(one(bundle, 'Practitioner').name).toEqual([{ text: 'Dr Sam Placeholder (demo)' }]);
  });

  it('gives the DiagnosticReport its R4 category LAB, panel code, conclusion, interpreter and every result and specimen', () => {
    const report = one(bundle, 'DiagnosticReport');
    const urlOf = (t: string) => `urn:uuid:${one(bundle, t).id}`;
    expect(report.status).toBe('final');
    // v2-0074 LAB "Laboratory" [confirmed as the standard].
    expect(report.category).toEqual([{ coding: [{ system: 'http://terminology.hl7.org/CodeSystem/v2-0074', code: 'LAB', display: 'Laboratory' }] }]);
    expect(report.code).toEqual({
      coding: [{ system: CRISTAE_SYSTEMS.panels, code: 'rc-enzyme-panel', display: 'Respiratory-chain enzyme activities' }],
      text: 'Respiratory-chain enzyme activities',
    });
    expect(report.identifier).toEqual([{ system: CRISTAE_SYSTEMS.reportVersion, value: 'DEMO-25-0142/v1' }]);
    expect(report.subject).toEqual({ reference: urlOf('Patient') });
    expect(report.effectiveDateTime).toBe('2025-03-03');
    expect(report.issued).toBe('2025-03-14T09:30:00Z');
    expect(report.performer).toEqual([{ reference: urlOf('Organization') }]);
    expect(report.resultsInterpreter).toEqual([{ reference: urlOf('Practitioner') }]);
    expect(report.specimen).toEqual([{ reference: urlOf('Specimen') }]);
    expect(report.result).toEqual(resources(bundle, 'Observation').map((o) => ({ reference: `urn:uuid:${o.id}` })));
    expect(report.conclusion).toBe(doc.interpretation);
  });

  it('attaches the PDF as R4 Attachment: base64 data, its size and its base64 SHA-1 hash [confirmed as the standard]', () => {
    const [form] = one(bundle, 'DiagnosticReport').presentedForm as Array<Json>;
    expect(form).toEqual({
      contentType: 'application/pdf',
      data: PDF.toString('base64'),
      size: PDF.length,
      hash: createHash('sha1').update(PDF).digest('base64'),
      title: 'report-DEMO-25-0142-v1.pdf',
      creation: '2025-03-14T09:30:00Z',
    });
  });

  it('gives the report a generated XHTML narrative with <, > and & escaped (XML 1.0 §2.4 [confirmed]) and the caution', () => {
    const tricky = bundleOf(buildReportDocument({ laboratory: { name: 'Fernhollow <Demo> & Partners Laboratory' } }));
    const text = one(tricky, 'DiagnosticReport').text as { status: string; div: string };
    // Narrative.status "generated" and an XHTML div (R4 Narrative) [confirmed as the standard].
    expect(text.status).toBe('generated');
    expect(text.div).toBe(
      '<div xmlns="http://www.w3.org/1999/xhtml"><p>Fernhollow &lt;Demo&gt; &amp; Partners Laboratory: respiratory-chain enzyme report DEMO-25-0142, version 1 (final).</p>' +
        `<p>${reportCaution}</p></div>`,
    );
  });

  it('gives each observation the laboratory category, its code and text, subject, specimen, performer, times and status', () => {
    const o = observationFor(bundle, 'CI.activity');
    const urlOf = (t: string) => `urn:uuid:${one(bundle, t).id}`;
    expect(o.status).toBe('final');
    // observation-category "laboratory" [confirmed as the standard].
    expect(o.category).toEqual([{ coding: [{ system: 'http://terminology.hl7.org/CodeSystem/observation-category', code: 'laboratory', display: 'Laboratory' }] }]);
    expect(o.code).toEqual({ coding: [measureCoding('CI', 'activity')], text: 'NADH:ubiquinone oxidoreductase: activity' });
    expect(o.subject).toEqual({ reference: urlOf('Patient') });
    expect(o.specimen).toEqual({ reference: urlOf('Specimen') });
    expect(o.performer).toEqual([{ reference: urlOf('Organization') }]);
    expect(o.effectiveDateTime).toBe('2025-03-03');
    expect(o.issued).toBe('2025-03-14T09:30:00Z');
  });

  it('gives a value below its interval as the printed number in UCUM with its printed limits, the label and L', () => {
    // Demo row: CI activity 9.5 against 14–48 (one decimal), 9.5/28 = 33.9% of the mean.
    const o = observationFor(bundle, 'CI.activity');
    expect(o.valueQuantity).toEqual({ value: 9.5, unit: 'nmol/min/mg protein', system: 'http://unitsofmeasure.org', code: 'nmol/min/mg' });
    expect(o.referenceRange).toEqual([
      {
        low: { value: 14, unit: 'nmol/min/mg protein', system: 'http://unitsofmeasure.org', code: 'nmol/min/mg' },
        high: { value: 48, unit: 'nmol/min/mg protein', system: 'http://unitsofmeasure.org', code: 'nmol/min/mg' },
        text: 'Muscle, 1–16 y (demo)',
      },
    ]);
    expect(o.interpretation).toEqual([{ coding: [{ system: HL7.interpretation, code: 'L', display: 'Low' }] }]);
    expect(o.component).toEqual([
      {
        code: { coding: [{ system: CRISTAE_SYSTEMS.measures, code: 'pct-of-reference-mean', display: 'Percent of the reference mean' }] },
        valueQuantity: { value: 34, unit: '%', system: 'http://unitsofmeasure.org', code: '%' },
      },
    ]);
    expect(o.dataAbsentReason).toBeUndefined();
  });

  it('prints a ratio in the UCUM unity "1", and a within-interval value as N [confirmed: UCUM, HL7 v3]', () => {
    const o = observationFor(bundle, 'CII.ratio-to-CS');
    expect(o.valueQuantity).toEqual({ value: 0.29, unit: 'ratio', system: 'http://unitsofmeasure.org', code: '1' });
    expect(o.interpretation?.[0]?.coding[0]?.code).toBe('N');
  });

  it('keeps a flag and a criterion band as notes, the band with its reason when given', () => {
    expect(observationFor(bundle, 'CIV.activity').note).toEqual([{ text: 'Duplicate cuvettes differed by 14%; mean of the two reported' }]);
    // CI ratio to CS: 0.066/0.2 = 33% of the mean, no band; CI ratio to CII 0.21/0.8 = 26.25%, minor (below 30).
    expect(observationFor(bundle, 'CI.ratio-to-CS').note).toBeUndefined();
    expect(observationFor(bundle, 'CI.ratio-to-CII').note).toEqual([{ text: 'Minor diagnostic-criterion band' }]);
    const major = bundleOf(
      withResult(doc, 'CI', 'ratio_cii', { criterionBand: 'major', criterionBandNote: 'kept although the pattern shows no deficiency (demo)' }),
    );
    expect(observationFor(major, 'CI.ratio-to-CII').note).toEqual([
      { text: 'Major diagnostic-criterion band: kept although the pattern shows no deficiency (demo)' },
    ]);
  });

  it('carries the one specimen, reported, with its accession, type, receipt and collection times, condition and description', () => {
    const s = one(bundle, 'Specimen');
    expect(s.identifier).toEqual([{ system: CRISTAE_SYSTEMS.specimen, value: 'DEMO-25-0142/1' }]);
    expect(s.accessionIdentifier).toEqual({ system: CRISTAE_SYSTEMS.accession, value: 'DEMO-25-0142' });
    // Specimen.status "available" for an accepted specimen (R4 value set specimen-status) [confirmed as the standard].
    expect(s.status).toBe('available');
    expect(s.type).toEqual({ coding: [specimenTypeCoding('skeletal_muscle')], text: 'Skeletal muscle' });
    expect(s.subject).toEqual({ reference: `urn:uuid:${one(bundle, 'Patient').id}` });
    expect(s.receivedTime).toBe('2025-03-04T08:15:00Z');
    expect(s.collection).toEqual({ collectedDateTime: '2025-03-03' });
    expect(s.condition).toEqual([{ text: 'Frozen on dry ice, intact, labelled with two identifiers' }]);
    expect(s.note).toEqual([{ text: 'Left vastus lateralis, open biopsy, 48 mg wet weight' }]);
  });
});

describe('buildReportBundle: values and edges', () => {
  const doc = buildReportDocument();

  it('when a value has none, then the observation says why with data-absent-reason "unknown", no value and no interpretation', () => {
    const b = bundleOf(withResult(doc, 'CIII', 'activity', { value: null, status: 'not_compared', pctOfMean: null, criterionBand: null }));
    const o = observationFor(b, 'CIII.activity');
    expect(o.valueQuantity).toBeUndefined();
    // data-absent-reason "unknown" (R4) [confirmed as the standard].
    expect(o.dataAbsentReason).toEqual({
      coding: [{ system: 'http://terminology.hl7.org/CodeSystem/data-absent-reason', code: 'unknown', display: 'Unknown' }],
      text: 'No value',
    });
    expect(o.interpretation).toBeUndefined();
    expect(o.component).toBeUndefined();
  });

  it('when a value lies just under its lower limit, then the JSON number stays under it as printed (13.96, not 14.0) and is L', () => {
    const b = bundleOf(withResult(doc, 'CI', 'activity', { value: 13.96, status: 'below' }));
    const o = observationFor(b, 'CI.activity');
    expect(o.valueQuantity!.value).toBe(13.96);
    expect(o.valueQuantity!.value).toBeLessThan(o.referenceRange![0]!.low!.value);
    expect(o.interpretation?.[0]?.coding[0]?.code).toBe('L');
  });

  it('when a value lies just over its upper limit, then it stays over it (48.04, not 48.0) and is H', () => {
    const b = bundleOf(withResult(doc, 'CI', 'activity', { value: 48.04, status: 'above' }));
    const o = observationFor(b, 'CI.activity');
    expect(o.valueQuantity!.value).toBe(48.04);
    expect(o.valueQuantity!.value).toBeGreaterThan(o.referenceRange![0]!.high!.value);
    expect(o.interpretation).toEqual([{ coding: [{ system: HL7.interpretation, code: 'H', display: 'High' }] }]);
  });

  it('when a printed number is negative (a true minus sign on paper), then the JSON number is negative', () => {
    const b = bundleOf(
      withResult(doc, 'CII', 'activity', { value: -1.25, status: 'below', pctOfMean: -2.8, criterionBand: 'major', decimals: 2 }),
    );
    const o = observationFor(b, 'CII.activity');
    expect(o.valueQuantity!.value).toBe(-1.25);
    expect(o.component![0]!.valueQuantity.value).toBe(-2.8);
  });

  it('when only one limit exists, then the range has only that limit; with none there is no range', () => {
    const lowOnly = bundleOf(withResult(doc, 'CS', 'activity', { referenceUpper: null }));
    expect(observationFor(lowOnly, 'CS.activity').referenceRange).toEqual([
      { low: { value: 80, unit: 'nmol/min/mg protein', system: HL7.ucum, code: 'nmol/min/mg' }, text: 'Muscle, 1–16 y (demo)' },
    ]);
    const highOnly = bundleOf(withResult(doc, 'CS', 'activity', { referenceLower: null }));
    expect(observationFor(highOnly, 'CS.activity').referenceRange).toEqual([
      { high: { value: 220, unit: 'nmol/min/mg protein', system: HL7.ucum, code: 'nmol/min/mg' }, text: 'Muscle, 1–16 y (demo)' },
    ]);
    const none = bundleOf(withResult(doc, 'CS', 'activity', { referenceUpper: null, referenceLower: null }));
    expect(observationFor(none, 'CS.activity').referenceRange).toBeUndefined();
    const noInterval = bundleOf(withResult(doc, 'CS', 'activity', NO_INTERVAL));
    const o = observationFor(noInterval, 'CS.activity');
    expect(o.referenceRange).toBeUndefined();
    expect(o.interpretation).toBeUndefined();
    expect(o.component).toBeUndefined();
  });

  it('when a unit has no UCUM code, then the quantity keeps the printed unit and names no system or code', () => {
    const b = bundleOf(withResult(doc, 'CS', 'activity', { unit: 'U/g wet weight' }));
    const o = observationFor(b, 'CS.activity');
    expect(o.valueQuantity).toEqual({ value: 145.7, unit: 'U/g wet weight' });
    expect(o.referenceRange![0]!.low).toEqual({ value: 80, unit: 'U/g wet weight' });
  });

  it('when the % of the mean sits just under a criterion threshold, then the component keeps it under (19.96 → 19.96, not 20)', () => {
    const b = bundleOf(withResult(doc, 'CI', 'ratio_cs', { pctOfMean: 19.96, criterionBand: 'major', pctThresholds: [20, 30] }));
    const value = observationFor(b, 'CI.ratio-to-CS').component![0]!.valueQuantity.value;
    expect(value).toBeLessThan(20);
    expect(value).toBeCloseTo(19.96, 6);
  });

  it('when the collection time is not recorded, then neither the report, the observations nor the specimen carry one', () => {
    const b = bundleOf(buildReportDocument({ case: { collectedAt: null } }));
    expect(one(b, 'DiagnosticReport').effectiveDateTime).toBeUndefined();
    expect(observationFor(b, 'CI.activity').effectiveDateTime).toBeUndefined();
    const s = one(b, 'Specimen');
    expect(s.collection).toBeUndefined();
    expect(s.receivedTime).toBe('2025-03-04T08:15:00Z');
  });

  it('when the specimen was rejected, then it is unsatisfactory with its reason and disposition as notes, and there is no observation', () => {
    const b = bundleOf(buildRejectedReportDocument());
    const s = one(b, 'Specimen');
    // Specimen.status "unsatisfactory" (R4 value set specimen-status) [confirmed as the standard].
    expect(s.status).toBe('unsatisfactory');
    expect(s.note).toEqual([
      { text: 'Right vastus lateralis, needle biopsy, 12 mg wet weight' },
      { text: 'Rejected: Thawed in transit; enzyme activities in a thawed specimen are unreliable.' },
      { text: 'Disposition: Discarded after 7 days; the referring clinician was asked for a new frozen biopsy.' },
    ]);
    expect(resources(b, 'Observation')).toHaveLength(0);
    expect(one(b, 'DiagnosticReport').result).toEqual([]);
  });

  it('when the printed name has a blank before its comma, then the family name is the words before the comma without it', () => {
    // HumanName.family holds the family name, HumanName.text the name as printed (R4 datatypes) [confirmed as the
    // standard]; "Quillfeather , Marigold Anne" worked by hand: family "Quillfeather", given "Marigold", "Anne".
    const b = bundleOf(buildReportDocument({ patient: { name: 'Quillfeather , Marigold Anne' } }));
    expect(one(b, 'Patient').name).toEqual([{ text: 'Quillfeather , Marigold Anne', family: 'Quillfeather', given: ['Marigold', 'Anne'] }]);
  });

  it('when limits arrive without their interval label (the report schema refuses this), then no range is made and no value is null', () => {
    // A document built past the schema: in a stored report every limit comes with its interval's label.
    const unlabelled = withResult(doc, 'CS', 'activity', { intervalLabel: null, intervalVersion: null, status: 'not_compared' });
    const b = bundleOf(unlabelled);
    expect(observationFor(b, 'CS.activity').referenceRange).toBeUndefined();
    // FHIR JSON never carries null: an element without a value is left out (hl7.org/fhir/R4/json.html) [from memory].
    const nulls = (v: unknown, path: string): string[] =>
      v === null ? [path] : typeof v === 'object' ? Object.entries(v as Json).flatMap(([k, x]) => nulls(x, `${path}.${k}`)) : [];
    expect(nulls(b, 'bundle')).toEqual([]);
  });

  it('when a rejected specimen has no reason or disposition recorded, then the notes say so with nothing invented and no trailing blank', () => {
    // Only possible in a document built past the schema (a rejected specimen needs both); "Rejected: " + "" with the
    // blank dropped, worked by hand.
    const rejected = structuredClone(buildRejectedReportDocument());
    Object.assign(rejected.specimens[0]!.specimen, { rejectionReason: null, disposition: null });
    expect(one(bundleOf(rejected), 'Specimen').note).toEqual([
      { text: 'Right vastus lateralis, needle biopsy, 12 mg wet weight' },
      { text: 'Rejected:' },
      { text: 'Disposition:' },
    ]);
  });

  it('when the version is a correction, then the report and every observation are "corrected" and the identifier names v2', () => {
    const b = bundleOf(buildCorrectedReportDocument());
    const report = one(b, 'DiagnosticReport');
    expect(report.status).toBe('corrected');
    expect(report.identifier).toEqual([{ system: CRISTAE_SYSTEMS.reportVersion, value: 'DEMO-25-0142/v2' }]);
    for (const o of resources(b, 'Observation')) expect(o.status).toBe('corrected');
    expect(b.timestamp).toBe('2025-03-18T14:05:00Z');
  });
});

describe('buildReportBundle: two specimens', () => {
  const doc = buildTwoSpecimenReportDocument();

  it('gives each specimen its labelled identifier and its own observations, the reported one the receipt and collection times', () => {
    const b = bundleOf(doc, 'B');
    const [a, liver] = resources(b, 'Specimen');
    expect(a!.identifier).toEqual([{ system: CRISTAE_SYSTEMS.specimen, value: 'DEMO-25-0142/A' }]);
    expect(liver!.identifier).toEqual([{ system: CRISTAE_SYSTEMS.specimen, value: 'DEMO-25-0142/B' }]);
    expect(a!.receivedTime).toBeUndefined();
    expect(a!.collection).toBeUndefined();
    expect(liver!.receivedTime).toBe('2025-03-04T08:15:00Z');
    expect(liver!.collection).toEqual({ collectedDateTime: '2025-03-03' });
    expect(liver!.type).toEqual({ coding: [specimenTypeCoding('liver')], text: 'Liver' });
    const onLiver = resources(b, 'Observation').filter((o) => (o.specimen as { reference: string }).reference === `urn:uuid:${liver!.id}`);
    expect(onLiver).toHaveLength(doc.specimens[1]!.results.length);
    expect(one(b, 'DiagnosticReport').specimen).toEqual([{ reference: `urn:uuid:${a!.id}` }, { reference: `urn:uuid:${liver!.id}` }]);
  });

  it('when no label or an unknown label is named, then the first specimen carries the times', () => {
    for (const label of [null, 'Z']) {
      const [a, liver] = resources(bundleOf(doc, label), 'Specimen');
      expect(a!.receivedTime).toBe('2025-03-04T08:15:00Z');
      expect(liver!.receivedTime).toBeUndefined();
    }
  });
});
