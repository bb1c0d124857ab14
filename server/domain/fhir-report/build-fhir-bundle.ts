import { createHash } from 'node:crypto';
import { v5 as uuidV5 } from 'uuid';
import { formatPercentOfMean, formatResultNumber, intervalThresholds } from '@/schemas/result-format';
import { reportCaution, type ReportDocument, type ReportResult, type ReportSpecimenSection } from '@/schemas/report-document';
import {
  CRISTAE_SYSTEMS,
  HL7,
  PANEL_CODE,
  PCT_OF_MEAN_CODE,
  interpretationCoding,
  measureCoding,
  measureText,
  specimenTypeCoding,
  ucumCodeOf,
} from './codes';

/*
 * One signed report version as an HL7 FHIR R4 Bundle (hl7.org/fhir/R4/bundle.html), type `collection`:
 * a DiagnosticReport with the stored PDF as its presentedForm, one Observation per printed activity and
 * ratio, a Specimen per specimen section, the Patient, the performing laboratory (Organization) and the
 * signing director (Practitioner). Every reference points at another entry's `urn:uuid:` fullUrl.
 *
 * Pure: the same stored report gives the same bundle, byte for byte. Resource ids are name-based UUIDs
 * (RFC 9562 version 5) of the report id and the resource's place in it, so a receiver that files the same
 * version twice sees the same ids. Numbers are the ones the report prints (same rounding), so the bundle
 * and the PDF never disagree.
 */

export type FhirReportInput = {
  reportId: number;
  /** The stored, frozen document the PDF was rendered from. */
  document: ReportDocument;
  /** The label of the specimen whose collection and receipt times head the report (null: the first). */
  reportedSpecimenLabel: string | null;
  pdf: Buffer;
  pdfFilename: string;
};

type Json = Record<string, unknown>;
type Entry = { fullUrl: string; resource: Json };

/** Namespace of Cristae's name-based ids: the v5 UUID of its code-system base URL in the URL namespace. */
const CRISTAE_NAMESPACE = uuidV5('https://cristae.example/fhir', uuidV5.URL);

const MINUS = '\u2212';
/** A printed number back to a JSON number (the printer uses a true minus sign). */
const printedNumber = (text: string): number => Number(text.replace(MINUS, '-').replace(/%$/, ''));

function quantity(value: number, printedUnit: string, decimals: number | undefined, thresholds = {}): Json {
  const code = ucumCodeOf(printedUnit);
  const q: Json = { value: printedNumber(formatResultNumber(value, decimals, thresholds)), unit: printedUnit };
  if (code !== null) Object.assign(q, { system: HL7.ucum, code });
  return q;
}

const escapeXml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

/** "Quillfeather, Marigold" → family Quillfeather, given Marigold; the printed form stays in `text`. */
function humanName(printed: string): Json {
  const comma = printed.indexOf(',');
  if (comma <= 0) return { text: printed };
  const given = printed.slice(comma + 1).trim().split(/\s+/).filter(Boolean);
  return { text: printed, family: printed.slice(0, comma).trim(), ...(given.length ? { given } : {}) };
}

function observation(
  r: ReportResult,
  ctx: { status: string; subject: string; specimen: string; performer: string; effective: Json; issued: string },
): Json {
  const coding = measureCoding(r.assay, r.measure);
  const limits = intervalThresholds({ lower: r.referenceLower, upper: r.referenceUpper });
  const interpretation = interpretationCoding(r.status);
  const range: Json = {};
  if (r.referenceLower !== null) range.low = quantity(r.referenceLower, r.unit, r.decimals);
  if (r.referenceUpper !== null) range.high = quantity(r.referenceUpper, r.unit, r.decimals);
  const notes = [...r.flags];
  if (r.criterionBand) notes.push(`${r.criterionBand === 'major' ? 'Major' : 'Minor'} diagnostic-criterion band${r.criterionBandNote ? `: ${r.criterionBandNote}` : ''}`);
  return {
    resourceType: 'Observation',
    status: ctx.status,
    category: [{ coding: [{ system: HL7.observationCategory, code: 'laboratory', display: 'Laboratory' }] }],
    code: { coding: [coding], text: measureText(r.assayName, r.measure) },
    subject: { reference: ctx.subject },
    ...ctx.effective,
    issued: ctx.issued,
    performer: [{ reference: ctx.performer }],
    ...(r.value !== null
      ? { valueQuantity: quantity(r.value, r.unit, r.decimals, limits) }
      : { dataAbsentReason: { coding: [{ system: HL7.dataAbsentReason, code: 'unknown', display: 'Unknown' }], text: 'No value' } }),
    ...(interpretation ? { interpretation: [{ coding: [interpretation] }] } : {}),
    ...(notes.length ? { note: notes.map((text) => ({ text })) } : {}),
    specimen: { reference: ctx.specimen },
    ...(r.intervalLabel !== null && (range.low || range.high) ? { referenceRange: [{ ...range, text: r.intervalLabel }] } : {}),
    ...(r.pctOfMean !== null
      ? {
          component: [
            {
              code: { coding: [{ system: CRISTAE_SYSTEMS.measures, ...PCT_OF_MEAN_CODE }] },
              valueQuantity: {
                value: printedNumber(formatPercentOfMean(r.pctOfMean, { below: r.pctThresholds ?? [] })),
                unit: '%',
                system: HL7.ucum,
                code: '%',
              },
            },
          ],
        }
      : {}),
  };
}

function specimenResource(
  section: ReportSpecimenSection,
  index: number,
  ctx: { accession: string; subject: string; reported: boolean; receivedAt: string; collectedAt: string | null },
): Json {
  const s = section.specimen;
  const notes = [s.description];
  if (!s.accepted) notes.push(`Rejected: ${s.rejectionReason ?? ''}`.trim(), `Disposition: ${s.disposition ?? ''}`.trim());
  return {
    resourceType: 'Specimen',
    identifier: [{ system: CRISTAE_SYSTEMS.specimen, value: `${ctx.accession}/${s.label ?? String(index + 1)}` }],
    accessionIdentifier: { system: CRISTAE_SYSTEMS.accession, value: ctx.accession },
    status: s.accepted ? 'available' : 'unsatisfactory',
    type: { coding: [specimenTypeCoding(s.type)], text: specimenTypeCoding(s.type).display },
    subject: { reference: ctx.subject },
    ...(ctx.reported ? { receivedTime: ctx.receivedAt } : {}),
    ...(ctx.reported && ctx.collectedAt ? { collection: { collectedDateTime: ctx.collectedAt } } : {}),
    condition: [{ text: s.conditionOnReceipt }],
    note: notes.map((text) => ({ text })),
  };
}

/** The R4 Bundle for one stored report version. */
export function buildReportBundle(input: FhirReportInput): Json {
  const { document: doc, reportId } = input;
  const id = (what: string) => uuidV5(`report/${reportId}/${what}`, CRISTAE_NAMESPACE);
  const url = (uuid: string) => `urn:uuid:${uuid}`;
  const entries: Entry[] = [];
  const add = (uuid: string, resource: Json): string => {
    entries.push({ fullUrl: url(uuid), resource: { resourceType: resource.resourceType, id: uuid, ...resource } });
    return url(uuid);
  };

  const status = doc.report.status; // 'final' or 'corrected': both are DiagnosticReport and Observation status codes
  const issued = doc.signature.signedAt;
  const effective: Json = doc.case.collectedAt ? { effectiveDateTime: doc.case.collectedAt } : {};

  const patient = add(id('patient'), {
    resourceType: 'Patient',
    identifier: [{ system: CRISTAE_SYSTEMS.labPatientId, value: doc.patient.labPatientId }],
    name: [humanName(doc.patient.name)],
    gender: doc.patient.sex,
    birthDate: doc.patient.dateOfBirth,
  });
  const lab = doc.laboratory;
  const organization = add(id('laboratory'), {
    resourceType: 'Organization',
    identifier: [{ system: CRISTAE_SYSTEMS.accreditation, value: lab.accreditationNumber }],
    name: lab.name,
    ...(lab.phone ? { telecom: [{ system: 'phone', value: lab.phone }] } : {}),
    address: [{ line: lab.addressLines }],
  });
  const signer = add(id('signer'), {
    resourceType: 'Practitioner',
    name: [{ text: doc.signature.signerName }],
  });

  const reportedIndex = Math.max(0, doc.specimens.findIndex((s) => s.specimen.label === input.reportedSpecimenLabel));
  const specimens: string[] = [];
  const results: string[] = [];
  doc.specimens.forEach((section, i) => {
    const specimen = add(
      id(`specimen/${i}`),
      specimenResource(section, i, {
        accession: doc.case.accession,
        subject: patient,
        reported: i === reportedIndex,
        receivedAt: doc.case.receivedAt,
        collectedAt: doc.case.collectedAt,
      }),
    );
    specimens.push(specimen);
    for (const r of section.results) {
      results.push(
        add(id(`specimen/${i}/${r.assay}/${r.measure}`), observation(r, { status, subject: patient, specimen, performer: organization, effective, issued })),
      );
    }
  });

  const pdfBase64 = input.pdf.toString('base64');
  const narrative =
    `<div xmlns="http://www.w3.org/1999/xhtml"><p>${escapeXml(`${lab.name}: respiratory-chain enzyme report ${doc.case.accession}, version ${doc.report.version} (${status}).`)}</p>` +
    `<p>${escapeXml(reportCaution)}</p></div>`;
  const report = add(id('diagnostic-report'), {
    resourceType: 'DiagnosticReport',
    text: { status: 'generated', div: narrative },
    identifier: [{ system: CRISTAE_SYSTEMS.reportVersion, value: `${doc.case.accession}/v${doc.report.version}` }],
    status,
    category: [{ coding: [{ system: HL7.diagnosticServiceSection, code: 'LAB', display: 'Laboratory' }] }],
    code: { coding: [{ system: CRISTAE_SYSTEMS.panels, ...PANEL_CODE }], text: PANEL_CODE.display },
    subject: { reference: patient },
    ...effective,
    issued,
    performer: [{ reference: organization }],
    resultsInterpreter: [{ reference: signer }],
    specimen: specimens.map((reference) => ({ reference })),
    result: results.map((reference) => ({ reference })),
    conclusion: doc.interpretation,
    presentedForm: [
      {
        contentType: 'application/pdf',
        data: pdfBase64,
        size: input.pdf.length,
        // Attachment.hash is the base64 SHA-1 of the data (hl7.org/fhir/R4/datatypes.html#Attachment).
        hash: createHash('sha1').update(input.pdf).digest('base64'),
        title: input.pdfFilename,
        creation: issued,
      },
    ],
  });
  // The report first: readers of a collection look for it at the top.
  const reportEntry = entries.find((e) => e.fullUrl === report)!;
  return {
    resourceType: 'Bundle',
    id: id('bundle'),
    identifier: { system: CRISTAE_SYSTEMS.reportVersion, value: `${doc.case.accession}/v${doc.report.version}` },
    type: 'collection',
    timestamp: issued,
    entry: [reportEntry, ...entries.filter((e) => e !== reportEntry)],
  };
}
