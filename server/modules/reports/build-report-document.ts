import type { AssayDefinition } from '@/schemas/assay';
import { transportConditionLabels, type CaseDetail, type Specimen } from '@/schemas/case';
import { specimenTypeLabels, type AssayCode } from '@/schemas/common';
import type { LabProfile } from '@/schemas/lab-profile';
import type { ReportDocument, ReportExcludedReplicate, ReportGraphic, ReportResult, ReportRun, ReportSpecimenSection } from '@/schemas/report-document';
import { ageAtCollectionText } from '../../domain/report-pdf/age-at-collection';
import { changedValuesBetween } from '../../domain/report-changes';
import { wallClock } from '../cases/lab-time';
import type { DraftFinding } from '../review/draft-interpretation';

/*
 * Assembles the ReportDocument that renderReportPdf prints, from the case with every one of its specimens, the
 * frozen results of each specimen and the laboratory profile. Pure: every value arrives as an argument, so the same inputs always
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
  /** Definition and interval versions used that their own drafter approved (absent: none). */
  selfApproved?: string[];
  /** Replicates left out of the calculations, for the methods section (absent: none). */
  excludedReplicates?: ReportExcludedReplicate[];
  /** The analytical runs the counted replicates came from, with their quality control (absent: none). */
  runs?: ReportRun[];
};

export type SignatureInput = { signerName: string; signerTitle: string; signedAt: Date; meaning: string };
export type VersionInput =
  | { version: 1; status: 'final' }
  | {
      version: number;
      status: 'corrected';
      supersedesVersion: number;
      correctionReason: string;
      changesSummary: string;
      /** The signed document this version supersedes: the printed values that differ are listed. */
      previous?: ReportDocument;
    };

export type ReportInputs = {
  laboratory: LabProfile;
  caseDetail: CaseDetail;
  clinician: { name: string; title: string | null };
  /** The specimen whose collection and receipt times head the report (see chooseReportedSpecimen). */
  primarySpecimen: Specimen;
  /** Results by specimen id; every specimen of caseDetail gets a section, with or without results. */
  resultsBySpecimen: ReadonlyMap<number, ReportableResults>;
  interpretation: string;
  signature: SignatureInput;
  version: VersionInput;
};

const COMPLEXES: AssayCode[] = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III'];

/**
 * The specimen that heads the report (its collection and receipt times, the stored report row): the first
 * accepted specimen with results, else the first accepted one, else the first specimen. Every specimen of the
 * case is printed in its own section regardless.
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

type Measured = { specimen: Specimen; results: ReportableResults };

function joinWords(words: string[]): string {
  return words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words.at(-1) ?? ''}`;
}

function methodsSummary(measured: Measured[], specimenCount: number): string {
  if (measured.length === 0) {
    return specimenCount === 1 ? 'No assays were performed on this specimen.' : 'No assays were performed on any specimen of this case.';
  }
  const tissues = joinWords([...new Set(measured.map((m) => specimenTypeLabels[m.specimen.type].toLowerCase()))]);
  const notes = [...new Set(measured.flatMap((m) => m.results.notes))];
  return [
    `Spectrophotometric kinetic assays of respiratory-chain complexes and citrate synthase (CS) in ${tissues} homogenate.`,
    'Each specific activity is the background-corrected rate converted with the Beer–Lambert law (A = ε·c·l) and expressed in nmol/min/mg protein,',
    'then relative to CS and to complex II (CII).',
    'Results are compared with this laboratory’s reference intervals for the specimen type and age; “% of ref. mean” is the result as a percentage of the interval’s mean.',
    ...notes,
  ].join(' ');
}

/** The excluded replicates of every measured specimen; nothing when there are none (older documents stay alike). */
function excludedOf(measured: Measured[]): { excludedReplicates?: ReportExcludedReplicate[] } {
  const all = measured.flatMap((m) => m.results.excludedReplicates ?? []);
  return all.length > 0 ? { excludedReplicates: all } : {};
}

/** The runs of every measured specimen; nothing when no result came from a run (older documents stay alike). */
function runsOf(measured: Measured[]): { runs?: ReportRun[] } {
  const all = measured.flatMap((m) => m.results.runs ?? []);
  return all.length > 0 ? { runs: all } : {};
}

/**
 * Separation of duties: when a version used was approved by the director who drafted it (allowed only in a
 * single-director laboratory), the methods section says so; nothing otherwise (older documents stay alike).
 */
function selfApprovalOf(measured: Measured[]): { selfApproval?: string } {
  const names = [...new Set(measured.flatMap((m) => m.results.selfApproved ?? []))];
  if (names.length === 0) return {};
  return {
    selfApproval:
      `Approved by the director who drafted it, as this single-director laboratory allows: ${joinWords(names)}. ` +
      'No second director reviewed these versions.',
  };
}

function graphicOf(results: ReportableResults | null): ReportGraphic {
  if (!results || results.results.length === 0) return { bars: [], criterionBands: null };
  const pct = (assay: AssayCode, measure: ReportResult['measure']) =>
    results.results.find((r) => r.assay === assay && r.measure === measure)?.pctOfMean ?? null;
  const nonNegative = (v: number | null) => (v === null ? null : Math.max(0, v));
  const bars = COMPLEXES.filter((a) => results.results.some((r) => r.assay === a))
    .map((assay) => ({
      assay,
      pctOfMeanRatioCs: nonNegative(pct(assay, 'ratio_cs')),
      pctOfMeanRatioCii: assay === 'CII' ? null : nonNegative(pct(assay, 'ratio_cii')),
    }))
    // A complex with neither ratio compared (no interval) has no bar to draw.
    .filter((b) => b.pctOfMeanRatioCs !== null || b.pctOfMeanRatioCii !== null);
  return { bars, criterionBands: results.criteria };
}

/** One specimen's section: accepted with its results (or none), or rejected with reason and disposition. */
function sectionOf(specimen: Specimen, found: ReportableResults | null): ReportSpecimenSection {
  const accepted = specimen.accepted;
  const results = accepted ? found : null;
  return {
    specimen: {
      label: specimen.label.trim() || undefined,
      type: specimen.type,
      description: describeSpecimen(specimen),
      conditionOnReceipt: transportConditionLabels[specimen.transportCondition],
      accepted,
      rejectionReason: accepted ? null : specimen.rejectionReason?.trim() || 'Reason not recorded',
      disposition: accepted ? null : 'Not analysed; no enzyme activities were measured on this specimen.',
    },
    results: results ? results.results : [],
    graphic: accepted ? graphicOf(results) : { bars: [], criterionBands: null },
    patternSummary: results?.patternSummary || null,
  };
}

/** The pattern line stored with the report row: the one summary, or each labelled by its specimen. */
export function reportPatternSummary(document: ReportDocument): string | null {
  const withSummary = document.specimens.filter((s) => s.patternSummary);
  if (withSummary.length <= 1) return withSummary[0]?.patternSummary ?? null;
  return withSummary
    .map((s, i) => `Specimen ${s.specimen.label ?? String(i + 1)} (${specimenTypeLabels[s.specimen.type].toLowerCase()}): ${s.patternSummary ?? ''}`)
    .join(' ');
}

export function buildReportDocument(inputs: ReportInputs): ReportDocument {
  const document = assemble(inputs);
  const { version } = inputs;
  if (version.status === 'corrected' && version.previous) {
    const changed = changedValuesBetween(version.previous, document);
    // A correction of the wording alone prints no table (and its document is what it was before this list existed).
    if (changed.length > 0) document.report.changedValues = changed;
  }
  return document;
}

function assemble(inputs: ReportInputs): ReportDocument {
  const { laboratory, caseDetail, primarySpecimen: specimen, resultsBySpecimen, signature, version } = inputs;
  const p = caseDetail.patient;
  const all = caseDetail.specimens.some((s) => s.id === specimen.id) ? caseDetail.specimens : [specimen, ...caseDetail.specimens];
  const sections = all.map((s) => sectionOf(s, resultsBySpecimen.get(s.id) ?? null));
  const measured = all.flatMap((s): Measured[] => {
    const r = resultsBySpecimen.get(s.id);
    return s.accepted && r && r.results.length > 0 ? [{ specimen: s, results: r }] : [];
  });
  const definitions = new Map<string, ReportableResults['definitions'][number]>();
  for (const d of measured.flatMap((m) => m.results.definitions)) definitions.set(`${d.assay}/${d.version}`, d);
  const clinician = inputs.clinician.title ? `${inputs.clinician.name}, ${inputs.clinician.title}` : inputs.clinician.name;
  return {
    laboratory: {
      name: laboratory.name,
      addressLines: laboratory.addressLines.filter((l) => l.trim().length > 0).slice(0, 6),
      accreditationNumber: laboratory.accreditationNumber,
      ...(laboratory.phone?.trim() ? { phone: laboratory.phone.trim() } : {}),
      timeZone: laboratory.timeZone,
    },
    patient: {
      name: `${p.familyName}, ${p.givenName}`,
      labPatientId: p.labPatientId,
      dateOfBirth: p.dateOfBirth,
      sex: p.sex,
      ageAtCollection: ageAtCollectionText(
        p.dateOfBirth,
        specimen.collectedAt ? labDate(new Date(specimen.collectedAt), laboratory.timeZone) : null,
      ),
    },
    case: {
      accession: caseDetail.accession,
      referringClinicianName: clinician,
      clinicalIndication: caseDetail.clinicalIndication,
      receivedAt: new Date(specimen.receivedAt).toISOString(),
      collectedAt: specimen.collectedAt ? new Date(specimen.collectedAt).toISOString() : null,
    },
    specimens: sections,
    interpretation: inputs.interpretation.trim(),
    methods: {
      summary: methodsSummary(measured, sections.length),
      definitions: [...definitions.values()],
      ...selfApprovalOf(measured),
      ...excludedOf(measured),
      ...runsOf(measured),
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
