import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import { specimenTypeLabels } from '@/schemas/common';
import type { ResultStatus } from '@/schemas/report-document';

/*
 * The code systems and units a Cristae FHIR bundle uses. Cristae's own codes live under the reserved
 * example domain `cristae.example` (RFC 2606 reserves .example for documentation), so no one mistakes them
 * for a published terminology; a laboratory that maps them to LOINC or SNOMED CT does so in its interface
 * engine. HL7 code systems are named by their canonical URLs from FHIR R4 (hl7.org/fhir/R4).
 */

const BASE = 'https://cristae.example/fhir';

export const CRISTAE_SYSTEMS = {
  /** Cristae's own measure codes: one per assay × measure, e.g. `CI.activity`, `CIV.ratio-to-CS`. */
  measures: `${BASE}/CodeSystem/rc-measures`,
  /** The report panel as a whole (DiagnosticReport.code). */
  panels: `${BASE}/CodeSystem/rc-panels`,
  specimenTypes: `${BASE}/CodeSystem/specimen-types`,
  labPatientId: `${BASE}/NamingSystem/lab-patient-id`,
  accession: `${BASE}/NamingSystem/accession`,
  reportVersion: `${BASE}/NamingSystem/report-version`,
  specimen: `${BASE}/NamingSystem/specimen`,
  accreditation: `${BASE}/NamingSystem/accreditation-number`,
} as const;

export const HL7 = {
  ucum: 'http://unitsofmeasure.org',
  interpretation: 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation',
  observationCategory: 'http://terminology.hl7.org/CodeSystem/observation-category',
  diagnosticServiceSection: 'http://terminology.hl7.org/CodeSystem/v2-0074',
  dataAbsentReason: 'http://terminology.hl7.org/CodeSystem/data-absent-reason',
  referenceRangeMeaning: 'http://terminology.hl7.org/CodeSystem/referencerange-meaning',
} as const;

export const PANEL_CODE = { code: 'rc-enzyme-panel', display: 'Respiratory-chain enzyme activities' } as const;
export const PCT_OF_MEAN_CODE = { code: 'pct-of-reference-mean', display: 'Percent of the reference mean' } as const;

const ASSAY_NAMES: Record<AssayCode, string> = {
  CI: 'Complex I',
  CII: 'Complex II',
  CIII: 'Complex III',
  CIV: 'Complex IV',
  'CI+III': 'Complex I+III',
  'CII+III': 'Complex II+III',
  CS: 'Citrate synthase',
};

const MEASURE_SUFFIX: Record<Measure, { code: string; words: string }> = {
  activity: { code: 'activity', words: 'activity' },
  ratio_cs: { code: 'ratio-to-CS', words: 'activity ratio to citrate synthase' },
  ratio_cii: { code: 'ratio-to-CII', words: 'activity ratio to complex II' },
};

/** Cristae's code and fixed display for one assay's measure, e.g. `CI.ratio-to-CS`. */
export function measureCoding(assay: AssayCode, measure: Measure): { system: string; code: string; display: string } {
  const m = MEASURE_SUFFIX[measure];
  return { system: CRISTAE_SYSTEMS.measures, code: `${assay}.${m.code}`, display: `${ASSAY_NAMES[assay]} ${m.words}` };
}

/** The code's text as the report names the assay, e.g. "Complex I (NADH:ubiquinone oxidoreductase): activity". */
export function measureText(assayName: string, measure: Measure): string {
  return `${assayName}: ${MEASURE_SUFFIX[measure].words}`;
}

export function specimenTypeCoding(type: SpecimenType): { system: string; code: string; display: string } {
  return { system: CRISTAE_SYSTEMS.specimenTypes, code: type, display: specimenTypeLabels[type] };
}

/**
 * The UCUM code for a unit as the report prints it. UCUM has no words in its codes: "protein" stays in the
 * printed unit only, and a ratio of two activities in the same unit is the unity "1".
 */
const UCUM_BY_PRINTED_UNIT: ReadonlyArray<[RegExp, string]> = [
  [/^nmol\/min\/mg( protein)?$/, 'nmol/min/mg'],
  [/^mL·min⁻¹·mg⁻¹/, 'mL/min/mg'],
  [/^ratio$/, '1'],
];

export function ucumCodeOf(printedUnit: string): string | null {
  const unit = printedUnit.trim();
  return UCUM_BY_PRINTED_UNIT.find(([pattern]) => pattern.test(unit))?.[1] ?? null;
}

/** The HL7 v3 ObservationInterpretation code for a result's place against its interval (L, N, H). */
export function interpretationCoding(status: ResultStatus): { system: string; code: string; display: string } | null {
  switch (status) {
    case 'below':
      return { system: HL7.interpretation, code: 'L', display: 'Low' };
    case 'within':
      return { system: HL7.interpretation, code: 'N', display: 'Normal' };
    case 'above':
      return { system: HL7.interpretation, code: 'H', display: 'High' };
    default:
      return null;
  }
}
