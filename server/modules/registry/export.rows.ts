import { randomBytes } from 'node:crypto';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import type { CohortValue } from '@/schemas/registry';

/*
 * The rows of the registry export: one per signed specimen of a case's current report. Pure (the study-ID
 * source is passed in), so the de-identification rules can be read in one place:
 *
 * HIPAA Safe Harbor, 45 CFR 164.514(b)(2): of the 18 identifier kinds the de-identified export carries none.
 * No names, lab patient IDs, accession numbers, specimen labels or any other record number; no free text
 * (clinical indication, interpretation, flags, interval labels); no date finer than the year; ages above 89
 * as the single group "90+". Each patient gets a random study ID, the same for all their rows within one
 * export, drawn afresh for every export and unrelated to any number Cristae keeps (Safe Harbor allows such a
 * code when it is not derived from the person's information, (c)(1)).
 */

/** One signed specimen with what either export may need; the de-identified one reads only the safe fields. */
export type ExportSpecimen = {
  /** The patient's database key: only used to give the same study ID to the same person. */
  patientKey: number;
  patientName: string;
  labPatientId: string;
  dateOfBirth: string;
  accession: string;
  specimenLabel: string;
  specimenType: SpecimenType;
  accepted: boolean;
  sex: string;
  /** Completed years at collection (receipt when collection was not recorded); null when unknown. */
  ageYears: number | null;
  /** The laboratory's calendar day of collection (or receipt), YYYY-MM-DD. */
  collectedOn: string;
  /** The laboratory's calendar day the current version was signed, YYYY-MM-DD. */
  signedOn: string;
  reportStatus: 'final' | 'corrected';
  reportVersion: number;
  patternCode: string | null;
  values: readonly CohortValue[];
};

type Cell = string | number | null;

/** Every assay × measure the report prints, in the report's order (CS has an activity only, CII no ratio to itself). */
const ASSAYS: readonly AssayCode[] = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS'];
const MEASURES: readonly Measure[] = ['activity', 'ratio_cs', 'ratio_cii'];
export const EXPORT_MEASURES: ReadonlyArray<{ assay: AssayCode; measure: Measure }> = ASSAYS.flatMap((assay) =>
  MEASURES.filter((m) => !(assay === 'CS' && m !== 'activity') && !(assay === 'CII' && m === 'ratio_cii')).map((measure) => ({ assay, measure })),
);

const MEASURE_COLUMN: Record<Measure, string> = { activity: 'activity_nmol_min_mg', ratio_cs: 'ratio_to_cs', ratio_cii: 'ratio_to_cii' };

const RESULT_COLUMNS = EXPORT_MEASURES.flatMap(({ assay, measure }) => {
  const base = `${assay}_${MEASURE_COLUMN[measure]}`;
  return [base, `${base}_pct_of_ref_mean`, `${base}_ref_lower`, `${base}_ref_upper`];
});

const DEIDENTIFIED_COLUMNS = [
  'study_id',
  'sex',
  'age_at_collection_years',
  'collection_year',
  'report_year',
  'specimen_type',
  'specimen_accepted',
  'report_status',
  'report_version',
  'pattern',
];
const IDENTIFIED_COLUMNS = [
  'lab_patient_id',
  'patient_name',
  'date_of_birth',
  'sex',
  'age_at_collection_years',
  'accession',
  'specimen_label',
  'collected_on',
  'report_date',
  'specimen_type',
  'specimen_accepted',
  'report_status',
  'report_version',
  'pattern',
];

export function exportColumns(deidentified: boolean): string[] {
  return [...(deidentified ? DEIDENTIFIED_COLUMNS : IDENTIFIED_COLUMNS), ...RESULT_COLUMNS];
}

/** Safe Harbor (b)(2)(i)(C): all ages over 89 aggregated into one category, "90+". */
export function safeHarborAge(years: number | null): Cell {
  if (years === null) return null;
  return years > 89 ? '90+' : years;
}

/** Six significant figures: the stored doubles without floating-point tails. */
const figure = (v: number | null): Cell => (v === null ? null : Number(v.toPrecision(6)));

function resultCells(values: readonly CohortValue[]): Cell[] {
  const byKey = new Map(values.map((v) => [`${v.assay}/${v.measure}`, v]));
  return EXPORT_MEASURES.flatMap(({ assay, measure }) => {
    const v = byKey.get(`${assay}/${measure}`);
    return v ? [figure(v.value), figure(v.pctOfMean), figure(v.lower), figure(v.upper)] : [null, null, null, null];
  });
}

/** A fresh random study ID: 10 hex digits from the system's cryptographic generator. */
export const randomStudyId = (): string => `ST-${randomBytes(5).toString('hex').toUpperCase()}`;

/** Study IDs for one export: the same patient always gets the same ID, two patients never share one. */
export function studyIdsFor(draw: () => string = randomStudyId): (patientKey: number) => string {
  const byPatient = new Map<number, string>();
  const taken = new Set<string>();
  return (patientKey) => {
    let id = byPatient.get(patientKey);
    if (id === undefined) {
      do id = draw();
      while (taken.has(id));
      taken.add(id);
      byPatient.set(patientKey, id);
    }
    return id;
  };
}

export function exportRow(s: ExportSpecimen, deidentified: boolean, studyIdOf: (patientKey: number) => string): Cell[] {
  const common: Cell[] = [s.specimenType, s.accepted ? 'yes' : 'no', s.reportStatus, s.reportVersion, s.patternCode];
  const head: Cell[] = deidentified
    ? [studyIdOf(s.patientKey), s.sex, safeHarborAge(s.ageYears), s.collectedOn.slice(0, 4), s.signedOn.slice(0, 4), ...common]
    : [s.labPatientId, s.patientName, s.dateOfBirth, s.sex, s.ageYears, s.accession, s.specimenLabel, s.collectedOn, s.signedOn, ...common];
  return [...head, ...resultCells(s.values)];
}
