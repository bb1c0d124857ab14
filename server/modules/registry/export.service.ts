import { stringify } from 'csv-stringify/sync';
import type { Sequelize } from 'sequelize';
import { ageBands, type CohortCriteria, type CohortMember, type RegistryExportQuery } from '@/schemas/registry';
import type { User } from '@/schemas/user';
import { writeTransaction } from '../../db/write-transaction';
import { recordAudit } from '../audit/audit.service';
import { labTimeZone } from '../cases/lab-zone';
import { labDate } from '../reports/build-report-document';
import { ageInYears } from '../results/results.service';
import { eachCohortBatch } from './cohort.repository';
import { contextOfMembers, memberKey, signedSpecimensWithoutCohortRows, type UnmeasuredSpecimen } from './export.repository';
import { exportColumns, exportRow, studyIdsFor, type ExportSpecimen } from './export.rows';

/*
 * GET /api/registry/export.csv (directors only). The cohort's members under the same filters as the cohort
 * search, one row per signed specimen, as CSV (RFC 4180 quoting and CRLF line ends by csv-stringify, UTF-8 without a byte-order mark, cells that a
 * spreadsheet would run as a formula prefixed with an apostrophe). The whole file is built before anything is
 * sent, so the audit event records the exact row count and a failed audit sends nothing.
 */

const BATCH = 500;

/** Criteria that only result values can meet: specimens without results never match them. */
const asksAboutResults = (c: CohortCriteria) => Boolean(c.pattern || c.complex || (c.range && c.range.length > 0));

/** The same non-result criteria cohortWhere applies, for the specimens the cohort tables do not hold. */
function matchesWithoutResults(s: { specimenType: string; sex: string; ageYears: number | null; signedOn: string }, c: CohortCriteria): boolean {
  if (c.specimenType && s.specimenType !== c.specimenType) return false;
  if (c.sex && s.sex !== c.sex) return false;
  if (c.ageBand) {
    const band = ageBands[c.ageBand];
    if (s.ageYears === null || s.ageYears < band.min || (band.max !== null && s.ageYears > band.max)) return false;
  }
  if (c.signedFrom && s.signedOn < c.signedFrom) return false;
  if (c.signedTo && s.signedOn > c.signedTo) return false;
  return true;
}

const completedYears = (dateOfBirth: string, at: Date): number | null => {
  const years = ageInYears(dateOfBirth, at);
  return years === null ? null : Math.floor(years);
};

function fromUnmeasured(u: UnmeasuredSpecimen, zone: string): ExportSpecimen {
  return {
    ...u,
    ageYears: completedYears(u.dateOfBirth, u.collectedOrReceivedAt),
    collectedOn: labDate(u.collectedOrReceivedAt, zone),
    signedOn: labDate(u.signedAt, zone),
    patternCode: null,
    values: [],
  };
}

export type RegistryExport = { csv: string; rows: number; filename: string };

export async function exportRegistry(sequelize: Sequelize, user: User, query: RegistryExportQuery): Promise<RegistryExport> {
  const { deidentified: flag, ...criteria } = query;
  const deidentified = flag === 'true';
  const zone = await labTimeZone();
  const studyIdOf = studyIdsFor();
  const options = { escape_formulas: true, record_delimiter: 'windows' } as const;
  const chunks: string[] = [stringify([exportColumns(deidentified)], options)];
  let rows = 0;
  const write = (specimens: ExportSpecimen[]) => {
    if (specimens.length === 0) return;
    chunks.push(stringify(specimens.map((s) => exportRow(s, deidentified, studyIdOf)), options));
    rows += specimens.length;
  };

  await eachCohortBatch(criteria, BATCH, async (members: CohortMember[]) => {
    const context = await contextOfMembers(members);
    write(
      members.flatMap((m) => {
        const c = context.get(memberKey(m.caseId, m.specimenLabel));
        if (!c) return [];
        return [{ ...m, ...c, collectedOn: labDate(c.collectedOrReceivedAt, zone) }];
      }),
    );
  });
  if (!asksAboutResults(criteria)) {
    const others = (await signedSpecimensWithoutCohortRows(sequelize)).map((u) => fromUnmeasured(u, zone));
    write(others.filter((s) => matchesWithoutResults(s, criteria)));
  }

  await writeTransaction(sequelize, (t) =>
    recordAudit(
      user,
      {
        action: 'export',
        entity: 'registry-export',
        after: { deidentified, filters: criteria, rows },
        note: deidentified ? 'De-identified research export (HIPAA Safe Harbor)' : 'Identified registry export',
      },
      t,
    ),
  );
  const day = labDate(new Date(), zone);
  return { csv: chunks.join(''), rows, filename: `cristae-registry-${deidentified ? 'deidentified' : 'identified'}-${day}.csv` };
}
