import type { AssayDefinition } from '@/schemas/assay';
import { transportConditionLabels, type CaseDetail, type Specimen } from '@/schemas/case';
import { specimenTypeLabels, type AssayCode } from '@/schemas/common';
import type { LabProfile } from '@/schemas/lab-profile';
import type { ReportDocument, ReportResult } from '@/schemas/report-document';
import { wallClock } from '../cases/lab-time';
import type { DraftFinding } from '../review/draft-interpretation';

/*
 * Assembles the ReportDocument that renderReportPdf prints, from the case, the reported specimen, the frozen
 * results and the laboratory profile. Pure: every value arrives as an argument, so the same inputs always
 * give the same document (and so the same PDF bytes).
 */

/** The results of one specimen, already in the report's shape (the adapter from CaseResults builds these). */
export type ReportableResults = {
  specimenId: number;
  results: ReportResult[];
  patternSummary: string | null;
  findings: DraftFinding[];
  definitions: Array<{ assay: AssayCode; version: number; description: string }>;
  /** The criterion bands that apply to this specimen class; null when none were computed. */
  criteria: { majorBelowPct: number; minorBelowPct: number; ruleSetLabel: string } | null;
  /** Remarks about the results worth a line on the report (e.g. a value with no interval). */
  notes: string[];
};

export type SignatureInput = { signerName: string; signerTitle: string; signedAt: Date; meaning: string };
export type VersionInput =
  | { version: 1; status: 'final' }
  | { version: number; status: 'corrected'; supersedesVersion: number; correctionReason: string; changesSummary: string };

export type ReportInputs = {
  laboratory: LabProfile;
  caseDetail: CaseDetail;
  clinician: { name: string; title: string | null };
  specimen: Specimen;
  results: ReportableResults | null;
  interpretation: string;
  signature: SignatureInput;
  version: VersionInput;
};

const COMPLEXES: AssayCode[] = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III'];

/**
 * The specimen a report is about: the first accepted specimen with results, else the first accepted one,
 * else the first specimen (a rejected specimen still gets a report that says so).
 */
export function chooseReportedSpecimen(
  specimens: readonly Specimen[],
  hasResults: (specimenId: number) => boolean,
): Specimen | null {
  return (
    specimens.find((s) => s.accepted && hasResults(s.id)) ??
    specimens.find((s) => s.accepted) ??
    specimens[0] ??
    null
  );
}

/** "2025-03-14": the calendar day of an instant in the laboratory's zone. */
export function labDate(instant: Date, timeZone: string): string {
  const w = wallClock(instant, timeZone);
  return `${w.year}-${String(w.month).padStart(2, '0')}-${String(w.day).padStart(2, '0')}`;
}

function describeSpecimen(s: Specimen): string {
  const parts = [`Specimen ${s.label}`, s.source.trim() || 'source not stated'];
  if (s.wetWeightMg !== null) parts.push(`${Math.round(s.wetWeightMg * 10) / 10} mg wet weight`);
  return parts.join(', ');
}

/** Other specimens of the case, one line each, so the report accounts for every specimen received. */
function otherSpecimensLine(all: readonly Specimen[], reported: Specimen): string | null {
  const others = all.filter((s) => s.id !== reported.id);
  if (others.length === 0) return null;
  const lines = others.map((s) => {
    const what = `${s.label} (${specimenTypeLabels[s.type].toLowerCase()})`;
    return s.accepted ? `${what}: accepted; not part of this report` : `${what}: rejected on receipt, ${s.rejectionReason ?? 'reason not recorded'}`;
  });
  return `Other specimens of this case: ${lines.join('; ')}.`;
}

export function describeDefinition(d: AssayDefinition): string {
  const background =
    d.background === 'inhibitor'
      ? `specific rate = total rate minus the rate with ${d.backgroundNote || 'the inhibitor'}`
      : d.background === 'baseline'
        ? `specific rate = rate after the substrate minus the ${d.backgroundNote || 'baseline rate'}`
        : 'no background rate subtracted';
  const model = d.rateModel === 'first_order' ? '; first-order rate constant' : '';
  return `${d.name}: ${d.chromophore} at ${d.wavelengthNm} nm, ε ${d.epsilonPerMmPerCm} mM⁻¹cm⁻¹; ${background}${model}.`;
}

function methodsSummary(specimen: Specimen, results: ReportableResults | null): string {
  if (!specimen.accepted || !results || results.results.length === 0) return 'No assays were performed on this specimen.';
  const tissue = specimenTypeLabels[specimen.type].toLowerCase();
  return [
    `Spectrophotometric kinetic assays of respiratory-chain complexes and citrate synthase (CS) in ${tissue} homogenate.`,
    'Each specific activity is the background-corrected rate converted with the Beer–Lambert law (A = ε·c·l) and expressed in nmol/min/mg protein,',
    'then relative to CS and to complex II (CII).',
    'Results are compared with this laboratory’s reference intervals for the specimen type and age; “% of ref. mean” is the result as a percentage of the interval’s mean.',
    ...results.notes,
  ].join(' ');
}

function graphicOf(results: ReportableResults | null): ReportDocument['graphic'] {
  if (!results || results.results.length === 0) return { bars: [], criterionBands: null };
  const pct = (assay: AssayCode, measure: ReportResult['measure']) =>
    results.results.find((r) => r.assay === assay && r.measure === measure)?.pctOfMean ?? null;
  const nonNegative = (v: number | null) => (v === null ? null : Math.max(0, v));
  const bars = COMPLEXES.filter((a) => results.results.some((r) => r.assay === a)).map((assay) => ({
    assay,
    pctOfMeanRatioCs: nonNegative(pct(assay, 'ratio_cs')),
    pctOfMeanRatioCii: assay === 'CII' ? null : nonNegative(pct(assay, 'ratio_cii')),
  }));
  return { bars, criterionBands: results.criteria };
}

export function buildReportDocument(inputs: ReportInputs): ReportDocument {
  const { laboratory, caseDetail, specimen, results, signature, version } = inputs;
  const p = caseDetail.patient;
  const accepted = specimen.accepted;
  const others = otherSpecimensLine(caseDetail.specimens, specimen);
  const condition = [transportConditionLabels[specimen.transportCondition], others].filter(Boolean).join('. ');
  const clinician = inputs.clinician.title ? `${inputs.clinician.name}, ${inputs.clinician.title}` : inputs.clinician.name;
  return {
    laboratory: {
      name: laboratory.name,
      addressLines: laboratory.addressLines.filter((l) => l.trim().length > 0).slice(0, 6),
      accreditationNumber: laboratory.accreditationNumber,
      timeZone: laboratory.timeZone,
    },
    patient: {
      name: `${p.familyName}, ${p.givenName}`,
      labPatientId: p.labPatientId,
      dateOfBirth: p.dateOfBirth,
      sex: p.sex,
    },
    case: {
      accession: caseDetail.accession,
      referringClinicianName: clinician,
      clinicalIndication: caseDetail.clinicalIndication,
      receivedAt: new Date(specimen.receivedAt).toISOString(),
      collectedAt: specimen.collectedAt ? new Date(specimen.collectedAt).toISOString() : null,
    },
    specimen: {
      type: specimen.type,
      description: describeSpecimen(specimen),
      conditionOnReceipt: condition,
      accepted,
      rejectionReason: accepted ? null : specimen.rejectionReason?.trim() || 'Reason not recorded',
      disposition: accepted ? null : 'Not analysed; no enzyme activities were measured on this specimen.',
    },
    results: accepted && results ? results.results : [],
    graphic: accepted ? graphicOf(results) : { bars: [], criterionBands: null },
    patternSummary: accepted && results?.patternSummary ? results.patternSummary : null,
    interpretation: inputs.interpretation.trim(),
    methods: {
      summary: methodsSummary(specimen, results),
      definitions: accepted && results ? results.definitions : [],
    },
    signature: {
      signerName: signature.signerName,
      signerTitle: signature.signerTitle,
      signedAt: signature.signedAt.toISOString(),
      meaning: signature.meaning,
    },
    report:
      version.status === 'final'
        ? {
            version: 1,
            status: 'final',
            reportDate: labDate(signature.signedAt, laboratory.timeZone),
            supersedesVersion: null,
            correctionReason: null,
            changesSummary: null,
          }
        : {
            version: version.version,
            status: 'corrected',
            reportDate: labDate(signature.signedAt, laboratory.timeZone),
            supersedesVersion: version.supersedesVersion,
            correctionReason: version.correctionReason,
            changesSummary: version.changesSummary,
          },
  };
}
