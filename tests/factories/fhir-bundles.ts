import type { AssayCode, Measure } from '@/schemas/common';
import type { ReportDocument, ReportResult } from '@/schemas/report-document';
import { buildReportBundle } from '../../server/domain/fhir-report/build-fhir-bundle';
import {
  buildCorrectedReportDocument,
  buildRejectedReportDocument,
  buildReportDocument,
  buildTwoSpecimenReportDocument,
} from './report-document';

/**
 * FHIR bundles of invented report documents, built in memory, for the bundle's unit test and its R4
 * conformance test. The PDF bytes are a stand-in (the bundle only encodes, sizes and hashes them).
 */

export type Json = Record<string, unknown>;
export type Coding = { system?: string; code?: string; display?: string };
export type Quantity = { value: number; unit: string; system?: string; code?: string };
export type Resource = Json & {
  resourceType: string;
  id: string;
  code?: { coding: Coding[]; text?: string };
  valueQuantity?: Quantity;
  referenceRange?: Array<{ low?: Quantity; high?: Quantity; text?: string }>;
  interpretation?: Array<{ coding: Coding[] }>;
  note?: Array<{ text: string }>;
  component?: Array<{ code: { coding: Coding[] }; valueQuantity: Quantity }>;
};
export type Bundle = Json & { entry: Array<{ fullUrl: string; resource: Resource }> };

export const PDF = Buffer.from('%PDF-1.7\n% invented demo bytes for the attachment\n%%EOF\n', 'latin1');

export function bundleOf(document: ReportDocument, reportedSpecimenLabel: string | null = null, reportId = 42): Bundle {
  return buildReportBundle({ reportId, document, reportedSpecimenLabel, pdf: PDF, pdfFilename: 'report-DEMO-25-0142-v1.pdf' }) as Bundle;
}

/** A copy of a document with one result row of its first specimen changed. */
export function withResult(doc: ReportDocument, assay: AssayCode, measure: Measure, change: Partial<ReportResult>): ReportDocument {
  const copy = structuredClone(doc);
  const section = copy.specimens[0]!;
  section.results = section.results.map((r) => (r.assay === assay && r.measure === measure ? { ...r, ...change } : r));
  return copy;
}

/** The fields of a result row for which no reference interval exists. */
export const NO_INTERVAL = {
  referenceUpper: null,
  referenceLower: null,
  referenceMean: null,
  intervalLabel: null,
  intervalVersion: null,
  status: 'not_compared',
  pctOfMean: null,
} as const;

/** Every shape of document the bundle code branches on, by name. */
export function variantDocuments(): Array<[string, ReportDocument, string | null]> {
  const doc = buildReportDocument();
  return [
    ['the demo final report with a telephone', buildReportDocument({ laboratory: { phone: '+00 0000 000000 (demo)' } }), null],
    ['a name split at its comma', buildReportDocument({ patient: { name: 'Quillfeather, Marigold  Anne' } }), null],
    ['a family name alone', buildReportDocument({ patient: { name: 'Quillfeather,  ' } }), null],
    ['markup characters in the laboratory name', buildReportDocument({ laboratory: { name: 'Fernhollow <Demo> & Partners Laboratory' } }), null],
    ['a value withheld', withResult(doc, 'CIII', 'activity', { value: null, status: 'not_compared', pctOfMean: null, criterionBand: null }), null],
    ['a negative value', withResult(doc, 'CII', 'activity', { value: -1.25, status: 'below', pctOfMean: -2.8, criterionBand: 'major', decimals: 2 }), null],
    ['only a lower limit', withResult(doc, 'CS', 'activity', { referenceUpper: null }), null],
    ['only an upper limit', withResult(doc, 'CS', 'activity', { referenceLower: null }), null],
    ['no interval', withResult(doc, 'CS', 'activity', NO_INTERVAL), null],
    ['a unit without a UCUM code', withResult(doc, 'CS', 'activity', { unit: 'U/g wet weight' }), null],
    ['no collection time', buildReportDocument({ case: { collectedAt: null } }), null],
    ['a rejected specimen', buildRejectedReportDocument(), null],
    ['a corrected version', buildCorrectedReportDocument(), null],
    ['two specimens, the second reported', buildTwoSpecimenReportDocument(), 'B'],
  ];
}
