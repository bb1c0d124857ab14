import {
  assayCodes,
  measures,
  specimenTypeLabels,
  specimenTypes,
  type AssayCode,
  type Measure,
  type SpecimenType,
} from '@/schemas/common';
import type {
  ControlCsvIssue,
  ControlDataUploadResult,
  ControlSeries,
  ControlSubject,
} from '@/schemas/reference-interval';
import { isBlankRecord, splitCsvRecords, type CsvRecord } from './csv-records';
import { ControlCsvError } from './errors';

/*
 * Control-data file: comma-separated, a header row, then one row per control subject.
 *   specimen_type, age_years          required
 *   control_id                        optional, free text kept with the subject
 *   unit                              optional, one activity unit per row (all rows must agree)
 *   CI, CII, CIII, CIV, CI+III, CII+III, CS
 *                                     activities; a header may carry its unit, "CI (nmol/min/mg)"
 * Empty activity cells mean "not measured". Everything is checked before anything is returned.
 */

const SPECIMEN_COLUMN = 'specimen_type';
const AGE_COLUMN = 'age_years';
const UNIT_COLUMN = 'unit';
const ID_COLUMN = 'control_id';
const MAX_AGE_YEARS = 130;
/** Beyond this many problems the list stops growing; the user fixes the pattern and uploads again. */
const MAX_ISSUES = 200;

const NUMBER_PATTERN = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const HEADER_UNIT_PATTERN = /^(.*?)\s*(?:\(([^()]*)\)|\[([^[\]]*)\])$/;

/** Which ratios each assay gets: X/CS for every complex, X/CII for the complexes other than CII. */
const RATIO_DENOMINATOR: Record<Exclude<Measure, 'activity'>, AssayCode> = {
  ratio_cs: 'CS',
  ratio_cii: 'CII',
};

type ColumnRole =
  | { kind: 'specimen' }
  | { kind: 'age' }
  | { kind: 'unit' }
  | { kind: 'id' }
  | { kind: 'assay'; assay: AssayCode; unit: string | null };

interface Column {
  index: number;
  /** The header text as written, used to name the column in messages. */
  name: string;
  role: ColumnRole;
}

function normaliseUnit(unit: string): string {
  return unit.toLowerCase().replace(/\s+/g, '').replace(/[\u00b5\u03bc]/g, 'u');
}

function normaliseWord(text: string): string {
  return text.trim().toLowerCase().replace(/[\s-]+/g, '_');
}

const specimenLookup = new Map<string, SpecimenType>();
for (const type of specimenTypes) {
  specimenLookup.set(normaliseWord(type), type);
  specimenLookup.set(normaliseWord(specimenTypeLabels[type]), type);
}

function matchAssay(text: string): AssayCode | null {
  const compact = text.replace(/\s+/g, '').toUpperCase();
  return assayCodes.find((code) => code === compact) ?? null;
}

function parseNumber(raw: string): number | null {
  const text = raw.trim();
  if (!NUMBER_PATTERN.test(text)) return null;
  const value = Number(text);
  return Number.isFinite(value) ? value : null;
}

function numberProblem(raw: string): string {
  const text = raw.trim();
  if (/^[+-]?\d+,\d+$/.test(text)) {
    return `"${text}" is not a number: use a point as the decimal separator`;
  }
  return `"${text}" is not a number`;
}

class IssueList {
  readonly items: ControlCsvIssue[] = [];
  private dropped = 0;

  add(row: number | null, column: string | null, message: string): void {
    if (this.items.length < MAX_ISSUES) this.items.push({ row, column, message });
    else this.dropped++;
  }

  get any(): boolean {
    return this.items.length > 0;
  }

  throwIfAny(): void {
    if (!this.any) return;
    const list =
      this.dropped > 0
        ? [...this.items, { row: null, column: null, message: `${this.dropped} more problem(s) not listed` }]
        : this.items;
    throw new ControlCsvError(list);
  }
}

function detectForeignDelimiter(header: CsvRecord): string | null {
  const joined = header.cells.join(',');
  if (header.cells.length > 1 && !/[;\t|]/.test(joined)) return null;
  if (joined.includes(';')) return 'semicolons';
  if (joined.includes('\t')) return 'tabs';
  if (joined.includes('|')) return 'vertical bars';
  return null;
}

function readHeader(header: CsvRecord, issues: IssueList): Column[] {
  const columns: Column[] = [];
  const seen = new Map<string, string>();
  header.cells.forEach((rawName, index) => {
    const name = rawName.trim();
    if (name === '') {
      issues.add(header.row, `column ${index + 1}`, 'The header cell is empty: name the column or delete it');
      return;
    }
    const word = normaliseWord(name);
    let role: ColumnRole | null = null;
    if (word === SPECIMEN_COLUMN) role = { kind: 'specimen' };
    else if (word === AGE_COLUMN) role = { kind: 'age' };
    else if (word === UNIT_COLUMN) role = { kind: 'unit' };
    else if (word === ID_COLUMN) role = { kind: 'id' };
    else {
      const withUnit = HEADER_UNIT_PATTERN.exec(name);
      const base = withUnit ? (withUnit[1] ?? '') : name;
      const unit = withUnit ? (withUnit[2] ?? withUnit[3] ?? '').trim() : '';
      const assay = matchAssay(base);
      if (assay) role = { kind: 'assay', assay, unit: unit === '' ? null : unit };
    }
    if (!role) {
      issues.add(
        header.row,
        name,
        `Unknown column; expected ${SPECIMEN_COLUMN}, ${AGE_COLUMN}, ${ID_COLUMN}, ${UNIT_COLUMN} ` +
          `or an assay code (${assayCodes.join(', ')})`,
      );
      return;
    }
    const key = role.kind === 'assay' ? `assay:${role.assay}` : role.kind;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      issues.add(header.row, name, `Appears twice (also as "${earlier}")`);
      return;
    }
    seen.set(key, name);
    columns.push({ index, name, role });
  });

  if (!seen.has('specimen')) {
    issues.add(header.row, SPECIMEN_COLUMN, `Missing the ${SPECIMEN_COLUMN} column`);
  }
  if (!seen.has('age')) issues.add(header.row, AGE_COLUMN, `Missing the ${AGE_COLUMN} column`);
  if (!columns.some((c) => c.role.kind === 'assay') && !issues.any) {
    issues.add(header.row, null, `No assay columns; expected some of ${assayCodes.join(', ')}`);
  }

  let firstUnit: { unit: string; column: string } | null = null;
  for (const column of columns) {
    if (column.role.kind !== 'assay' || column.role.unit === null) continue;
    if (firstUnit === null) firstUnit = { unit: column.role.unit, column: column.name };
    else if (normaliseUnit(column.role.unit) !== normaliseUnit(firstUnit.unit)) {
      issues.add(
        header.row,
        column.name,
        `Mixed units: "${column.role.unit}" here but "${firstUnit.unit}" in column "${firstUnit.column}"; ` +
          'convert all activities to one unit',
      );
    }
  }
  return columns;
}

interface ParsedRow {
  row: number;
  /** Null when a cell of the row is refused (its issues are listed). */
  subject: ControlSubject | null;
  /** The row's unit cell, checked against the others even when another cell of the row is refused. */
  unit: string | null;
}

/** True when a row has extra cells and two neighbours read like the halves of a decimal comma ("37", "5"). */
function looksLikeDecimalCommas(cells: readonly string[], width: number): boolean {
  return cells.length > width && cells.some((c, i) => i > 0 && /^\s*[+-]?\d+$/.test(cells[i - 1]!) && /^\d+\s*$/.test(c));
}

function readRow(record: CsvRecord, columns: Column[], width: number, issues: IssueList): ParsedRow | null {
  if (record.cells.length !== width) {
    const hint = looksLikeDecimalCommas(record.cells, width)
      ? '; a decimal comma such as 37,5 splits a value in two: use a point (37.5)'
      : '';
    issues.add(
      record.row,
      null,
      `Has ${record.cells.length} cells but the header has ${width}; check for a stray or missing comma${hint}`,
    );
    return null;
  }
  let specimenType: SpecimenType | null = null;
  let ageYears: number | null = null;
  let unit: string | null = null;
  let controlId: string | null = null;
  const activities: Partial<Record<AssayCode, number>> = {};
  let ok = true;
  const fail = (column: string, message: string): void => {
    issues.add(record.row, column, message);
    ok = false;
  };

  for (const column of columns) {
    const raw = (record.cells[column.index] ?? '').trim();
    switch (column.role.kind) {
      case 'specimen': {
        if (raw === '') fail(column.name, 'Missing specimen type');
        else {
          const type = specimenLookup.get(normaliseWord(raw));
          if (type) specimenType = type;
          else fail(column.name, `Unknown specimen type "${raw}"; expected one of ${specimenTypes.join(', ')}`);
        }
        break;
      }
      case 'age': {
        const age = raw === '' ? null : parseNumber(raw);
        if (raw === '') fail(column.name, 'Missing age');
        else if (age === null) fail(column.name, numberProblem(raw));
        else if (age < 0 || age > MAX_AGE_YEARS) {
          fail(column.name, `Age ${age} is outside 0–${MAX_AGE_YEARS} years`);
        } else ageYears = age;
        break;
      }
      case 'unit': {
        if (raw === '') fail(column.name, 'Missing unit');
        else unit = raw;
        break;
      }
      case 'id': {
        controlId = raw === '' ? null : raw;
        break;
      }
      case 'assay': {
        if (raw === '') break; // not measured for this subject
        const value = parseNumber(raw);
        if (value === null) fail(column.name, numberProblem(raw));
        else if (value < 0) fail(column.name, `Activity ${value} is negative; activities are 0 or more`);
        else activities[column.role.assay] = value;
        break;
      }
    }
  }
  const subject =
    ok && specimenType !== null && ageYears !== null
      ? { row: record.row, controlId, specimenType, ageYears, activities }
      : null;
  return { row: record.row, subject, unit };
}

function buildSeries(subjects: ControlSubject[], assays: AssayCode[], warnings: string[]): ControlSeries[] {
  const series: ControlSeries[] = [];
  const zeroDenominatorRows: Record<AssayCode, number[]> = { CI: [], CII: [], CIII: [], CIV: [], 'CI+III': [], 'CII+III': [], CS: [] };
  for (const specimenType of specimenTypes) {
    const group = subjects.filter((s) => s.specimenType === specimenType);
    if (group.length === 0) continue;
    for (const assay of assays) {
      for (const measure of measures) {
        const denominator = measure === 'activity' ? null : RATIO_DENOMINATOR[measure];
        if (denominator !== null && (assay === denominator || assay === 'CS')) continue;
        const points: ControlSeries['points'] = [];
        for (const s of group) {
          const value = s.activities[assay];
          if (value === undefined) continue;
          if (denominator === null) {
            points.push({ row: s.row, ageYears: s.ageYears, value });
            continue;
          }
          const base = s.activities[denominator];
          if (base === undefined) continue;
          if (base === 0) {
            if (!zeroDenominatorRows[denominator].includes(s.row)) zeroDenominatorRows[denominator].push(s.row);
            continue;
          }
          points.push({ row: s.row, ageYears: s.ageYears, value: value / base });
        }
        if (points.length > 0) series.push({ specimenType, assay, measure, points });
      }
    }
  }
  for (const denominator of ['CS', 'CII'] as const) {
    const rows = zeroDenominatorRows[denominator].sort((a, b) => a - b);
    if (rows.length > 0) {
      warnings.push(`${denominator} is 0 in row(s) ${rows.join(', ')}; ratios to ${denominator} left out for those rows`);
    }
  }
  return series;
}

/**
 * Reads a control-data CSV into per-subject activities and per-(specimen type, assay, measure) series,
 * ratios to CS and to CII included. Throws ControlCsvError listing every problem by row and column;
 * returns nothing partial.
 */
export function parseControlCsv(text: string): ControlDataUploadResult {
  const issues = new IssueList();
  const content = text.replace(/^\uFEFF/, '');
  if (content.trim() === '') {
    issues.add(null, null, 'The file is empty');
    issues.throwIfAny();
  }
  const split = splitCsvRecords(content);
  if ('issue' in split) throw new ControlCsvError([split.issue]);
  const nonBlank = split.records.filter((r) => !isBlankRecord(r));
  const header = nonBlank[0];
  if (!header) throw new ControlCsvError([{ row: null, column: null, message: 'The file is empty' }]);

  const foreign = detectForeignDelimiter(header);
  if (foreign) {
    throw new ControlCsvError([
      {
        row: header.row,
        column: null,
        message: `The columns are separated by ${foreign}; save the file with commas between columns`,
      },
    ]);
  }

  const columns = readHeader(header, issues);
  issues.throwIfAny();

  const dataRecords = nonBlank.slice(1);
  if (dataRecords.length === 0) {
    issues.add(null, null, 'The file has a header but no data rows');
    issues.throwIfAny();
  }

  const parsed: ParsedRow[] = [];
  for (const record of dataRecords) {
    const row = readRow(record, columns, header.cells.length, issues);
    if (row) parsed.push(row);
  }

  // Units: header suffixes and the unit column must all name the same unit, rows with other problems included.
  const unitColumn = columns.find((c) => c.role.kind === 'unit');
  const headerUnit = columns.find((c) => c.role.kind === 'assay' && c.role.unit !== null);
  let declared: { unit: string; where: string } | null =
    headerUnit && headerUnit.role.kind === 'assay' && headerUnit.role.unit !== null
      ? { unit: headerUnit.role.unit, where: `the header of column "${headerUnit.name}"` }
      : null;
  if (unitColumn) {
    for (const { row, unit } of parsed) {
      if (unit === null) continue;
      if (declared === null) declared = { unit, where: `row ${row}` };
      else if (normaliseUnit(unit) !== normaliseUnit(declared.unit)) {
        issues.add(
          row,
          unitColumn.name,
          `Mixed units: "${unit}" here but "${declared.unit}" in ${declared.where}; convert all activities to one unit`,
        );
      }
    }
  }
  issues.throwIfAny();

  // Every row read to the end here: any refused cell has thrown above.
  const subjects = parsed.flatMap((p) => (p.subject ? [p.subject] : []));
  const warnings: string[] = [];
  const empty = subjects.filter((s) => Object.keys(s.activities).length === 0).map((s) => s.row);
  if (empty.length > 0) warnings.push(`Row(s) ${empty.join(', ')} have no activity values`);
  if (declared === null) {
    warnings.push('The file names no unit; check that every activity is in the same unit before deriving intervals');
  }
  const assays = assayCodes.filter((code) =>
    columns.some((c) => c.role.kind === 'assay' && c.role.assay === code),
  );
  const series = buildSeries(subjects, assays, warnings);
  return {
    rowCount: subjects.length,
    unit: declared?.unit ?? null,
    assays,
    specimenTypes: specimenTypes.filter((t) => subjects.some((s) => s.specimenType === t)),
    subjects,
    series,
    warnings,
  };
}
