import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { PatternKind } from '@/schemas/assay';
import { assayCodes, measures, type AssayCode, type Measure, type SpecimenType } from '@/schemas/common';
import { cohortComplexes, rangeScales, type CohortComplex } from '@/schemas/registry';
import type { ReportDocument, ReportResult } from '@/schemas/report-document';
import { patternCodeOf } from '@/schemas/results';
import { intervalColumn, measureColumn } from './cohort-columns';
import { joinPlotCells, leavePlotCells } from './cohort-plot-cells';

/*
 * The rows of cohort_members and cohort_values (migrations 0016, 0017; the plot cells of 0018) for one signed report: one member per accepted
 * specimen with results (with each measure's value, % of mean and, for the ratios to CS, the interval as columns of
 * its own), one value per result row the report prints. Written at signing, in the signing
 * transaction, replacing the rows of any earlier version of the case; and by the migration for reports signed
 * before the tables existed. Raw, portable SQL only: the migration runs this before any model is bound.
 */

export const patternFlagColumns = {
  normal: 'isNormal',
  isolated_deficiency: 'isIsolated',
  combined_deficiency: 'isCombined',
  linked_activity_low: 'isLinked',
  raised_cs: 'isRaisedCs',
  insufficient_data: 'isInsufficient',
} as const satisfies Record<PatternKind, string>;

export const complexFlagColumns = {
  CI: 'lowCI',
  CII: 'lowCII',
  CIII: 'lowCIII',
  CIV: 'lowCIV',
  'CI+III': 'lowCI_III',
  'CII+III': 'lowCII_III',
} as const satisfies Record<CohortComplex, string>;

/** Every assay × measure a result can carry: citrate synthase has an activity only, complex II no ratio to itself. */
export const cohortMeasures: readonly { assay: AssayCode; measure: Measure }[] = assayCodes.flatMap((assay) =>
  measures.filter((m) => (assay === 'CS' ? m === 'activity' : !(assay === 'CII' && m === 'ratio_cii'))).map((measure) => ({ assay, measure })),
);

/** The member columns' names (cohort-columns.ts), here too for the modules that write or read the rows. */
export { intervalColumn, measureColumn };

const INTERVAL_BOUNDS = { lower: 'referenceLower', upper: 'referenceUpper', mean: 'referenceMean' } as const;

/** Every column migration 0017 adds to cohort_members, in order. */
export const measureColumns: readonly string[] = [
  ...cohortMeasures.flatMap(({ assay, measure }) => rangeScales.map((scale) => measureColumn(assay, measure, scale))),
  ...cohortComplexes.flatMap((c) => Object.keys(INTERVAL_BOUNDS).map((b) => intervalColumn(c, b as keyof typeof INTERVAL_BOUNDS))),
];

/** A specimen's printed values as member columns (the first row printed for a measure, null where none was). */
function measureColumnsOf(results: readonly ReportResult[]): Row {
  const row: Row = Object.fromEntries(measureColumns.map((c) => [c, null]));
  const seen = new Set<string>();
  for (const r of results) {
    const key = `${r.assay}:${r.measure}`;
    if (seen.has(key) || !cohortMeasures.some((m) => m.assay === r.assay && m.measure === r.measure)) continue;
    seen.add(key);
    row[measureColumn(r.assay, r.measure, 'value')] = r.value;
    row[measureColumn(r.assay, r.measure, 'pct')] = r.pctOfMean;
    if (r.measure === 'ratio_cs' && r.assay !== 'CS') {
      for (const [bound, field] of Object.entries(INTERVAL_BOUNDS)) row[intervalColumn(r.assay, bound as keyof typeof INTERVAL_BOUNDS)] = r[field];
    }
  }
  return row;
}

const DEFICIENCY_KINDS: readonly PatternKind[] = ['isolated_deficiency', 'combined_deficiency', 'linked_activity_low'];

export type CohortFinding = { kind: PatternKind; complexes: readonly AssayCode[] };

/** One accepted specimen of a signed report, with what the cohort tables keep of it. */
export type CohortSection = {
  specimenId: number | null;
  label: string;
  type: SpecimenType;
  /** Age at collection in years (fractional), or null when unknown. */
  ageYears: number | null;
  /** The pattern findings read for the specimen; null when none were read. */
  findings: readonly CohortFinding[] | null;
  results: readonly ReportResult[];
};

export type CohortSource = {
  reportId: number;
  caseId: number;
  accession: string;
  reportVersion: number;
  reportStatus: 'final' | 'corrected';
  sex: string;
  signedOn: string;
  sections: readonly CohortSection[];
};

type Row = Record<string, string | number | boolean | null>;

export function cohortRowsOf(src: CohortSource): { member: Row; values: Row[] }[] {
  return src.sections
    .filter((s) => s.results.length > 0)
    .map((s) => {
      const kinds = new Set((s.findings ?? []).map((f) => f.kind));
      const low = new Set((s.findings ?? []).filter((f) => DEFICIENCY_KINDS.includes(f.kind)).flatMap((f) => f.complexes));
      const member: Row = {
        reportId: src.reportId,
        caseId: src.caseId,
        specimenId: s.specimenId,
        accession: src.accession,
        reportVersion: src.reportVersion,
        reportStatus: src.reportStatus,
        specimenLabel: s.label,
        specimenType: s.type,
        sex: src.sex,
        ageYears: s.ageYears === null ? null : Math.floor(s.ageYears),
        signedOn: src.signedOn,
        patternCode: s.findings && s.findings.length > 0 ? patternCodeOf(s.findings) : null,
        ...measureColumnsOf(s.results),
      };
      for (const [kind, column] of Object.entries(patternFlagColumns)) member[column] = kinds.has(kind as PatternKind);
      for (const [complex, column] of Object.entries(complexFlagColumns)) member[column] = low.has(complex as AssayCode);
      const values = s.results.map((r) => ({
        assay: r.assay,
        measure: r.measure,
        value: r.value,
        pctOfMean: r.pctOfMean,
        lower: r.referenceLower,
        upper: r.referenceUpper,
        mean: r.referenceMean,
      }));
      return { member, values };
    });
}

/**
 * Replaces the case's cohort rows with those of its newest signed report, and moves its members out of their plot
 * cells and into the new ones (cohort-plot-cells.ts). Pass the signing transaction, so the rows, the cells and the
 * report are stored together or not at all. `measureColumns: false` writes the member columns of migration 0016
 * only, and no cells (its backfill runs before 0017 and 0018 add the others, and they fill them themselves).
 */
export async function writeCohortRows(
  sequelize: Sequelize,
  src: CohortSource,
  transaction?: Transaction,
  { measureColumns: withMeasures = true }: { measureColumns?: boolean } = {},
): Promise<void> {
  const qi = sequelize.getQueryInterface();
  const replacements = { caseId: src.caseId };
  if (withMeasures) await leavePlotCells(sequelize, src.caseId, transaction);
  await sequelize.query(
    `DELETE FROM cohort_values WHERE "memberId" IN (SELECT id FROM cohort_members WHERE "caseId" = :caseId)`,
    { replacements, transaction },
  );
  await sequelize.query(`DELETE FROM cohort_members WHERE "caseId" = :caseId`, { replacements, transaction });
  const rows = cohortRowsOf(src);
  if (rows.length === 0) return;
  if (!withMeasures) for (const r of rows) for (const c of measureColumns) delete r.member[c];
  else await joinPlotCells(sequelize, rows.map((r) => r.member), transaction);
  await qi.bulkInsert('cohort_members', rows.map((r) => r.member), { transaction });
  // Inserted in order, so ids ascend in the order of the rows.
  const ids = (await sequelize.query(`SELECT id FROM cohort_members WHERE "caseId" = :caseId ORDER BY id`, {
    replacements,
    transaction,
    type: QueryTypes.SELECT,
  })) as { id: number }[];
  const values = rows.flatMap((r, i) => r.values.map((v) => ({ ...v, memberId: ids[i]!.id })));
  if (values.length > 0) await qi.bulkInsert('cohort_values', values, { transaction });
}

/* ---------------------------------------------------------------- backfill */

type SpecimenRow = { id: number; caseId: number; label: string };
/** What the backfill reads of a specimen in cases.resultsSnapshot (CaseResults, src/schemas/results.ts). */
type SnapshotSpecimen = { specimenId: number; ageYears: number | null; pattern: { findings: CohortFinding[] } | null };

/** The cohort source of a stored report: sections from its document, findings from the case's frozen results. */
export function cohortSourceOfStored(
  report: { id: number; caseId: number; version: number; kind: string; accession: string },
  document: ReportDocument,
  specimens: readonly SpecimenRow[],
  snapshot: readonly SnapshotSpecimen[],
): CohortSource {
  const sections = document.specimens.flatMap((section, i): CohortSection[] => {
    if (!section.specimen.accepted || section.results.length === 0) return [];
    const label = section.specimen.label ?? String(i + 1);
    const specimen = specimens.find((s) => s.caseId === report.caseId && s.label === label) ?? null;
    const frozen = specimen ? snapshot.find((s) => s.specimenId === specimen.id) : undefined;
    return [
      {
        specimenId: specimen?.id ?? null,
        label,
        type: section.specimen.type,
        ageYears: frozen?.ageYears ?? null,
        findings: frozen?.pattern?.findings ?? null,
        results: section.results,
      },
    ];
  });
  return {
    reportId: report.id,
    caseId: report.caseId,
    accession: report.accession,
    reportVersion: report.version,
    reportStatus: report.kind === 'corrected' ? 'corrected' : 'final',
    sex: document.patient.sex,
    signedOn: document.report.reportDate,
    sections,
  };
}

const BACKFILL_CHUNK = 200;

/** Copies every case's current signed report into the cohort tables (migration 0016). */
export async function backfillCohort(sequelize: Sequelize): Promise<number> {
  let after = 0;
  let written = 0;
  for (;;) {
    const reports = (await sequelize.query(
      `SELECT r.id, r."caseId", r.version, r.kind, r.document, c.accession, c."resultsSnapshot"
         FROM reports r JOIN cases c ON c.id = r."caseId"
        WHERE r."supersededByReportId" IS NULL AND r.id > :after
        ORDER BY r.id LIMIT ${BACKFILL_CHUNK}`,
      { replacements: { after }, type: QueryTypes.SELECT },
    )) as { id: number; caseId: number; version: number; kind: string; document: string; accession: string; resultsSnapshot: string | null }[];
    if (reports.length === 0) return written;
    const specimens = (await sequelize.query(
      `SELECT id, "caseId", label FROM specimens WHERE "caseId" IN (:caseIds)`,
      { replacements: { caseIds: reports.map((r) => r.caseId) }, type: QueryTypes.SELECT },
    )) as SpecimenRow[];
    await sequelize.transaction(async (transaction) => {
      for (const r of reports) {
        const snapshot = r.resultsSnapshot ? ((JSON.parse(r.resultsSnapshot) as { specimens?: SnapshotSpecimen[] }).specimens ?? []) : [];
        const source = cohortSourceOfStored(r, JSON.parse(r.document) as ReportDocument, specimens, snapshot);
        await writeCohortRows(sequelize, source, transaction, { measureColumns: false });
        written += 1;
      }
    });
    after = reports.at(-1)!.id;
  }
}
