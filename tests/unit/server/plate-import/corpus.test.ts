import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  MAX_PLATE_ISSUES,
  plateParseResultSchema,
  type PlateIssueCode,
  type PlateParseResult,
} from '@/schemas/plate';
import { PlateImportError } from '../../../../server/domain/plate-import/errors';
import { parsePlateFile } from '../../../../server/domain/plate-import/parse-plate';

/*
 * Every file in tests/fixtures/plates has one row here. Expected values are read by eye from the
 * fixture text itself (see the README in that folder), not from the parser's output.
 * Sources for the text conventions the good files exercise:
 * - comma-separated values with optional double quotes and "" escapes, CR LF line breaks:
 *   RFC 4180 [from memory];
 * - tab-separated values: IANA media type text/tab-separated-values [from memory];
 * - UTF-8 with an optional byte-order mark EF BB BF; UTF-16 LE starts with FF FE: Unicode Standard
 *   ch. 2/3 and RFC 3629 [from memory];
 * - 96-well positions A1..H12: ANSI/SLAS 4-2004 [from memory].
 */

const corpusDir = path.resolve(
  path.dirname(fileURLToPath(import.meta.url)),
  '../../../fixtures/plates',
);

interface ExpectedIssue {
  code: PlateIssueCode;
  row: number | null;
  column?: string | null;
  columnNumber?: number | null;
  messageIncludes?: string;
}

type Expectation =
  | { ok: PlateParseResult }
  | { issues: ExpectedIssue[]; totalIssues?: number };

const ciWells = (rows: number[][]): PlateParseResult['wells'] =>
  ['A1', 'A2', 'B1', 'B2'].map((well, k) => ({
    well,
    header: well,
    columnNumber: k + 2,
    absorbances: rows.map((r) => r[k]!),
  }));

const corpus: Record<string, Expectation> = {
  'good-comma-ci.csv': {
    ok: {
      delimiter: 'comma',
      headerLine: 5,
      metadata: { wavelength_nm: '340', temperature_c: '30', plate_label: 'demo plate 7' },
      wavelengthNm: 340,
      timesS: [0, 20, 40, 60, 80, 100],
      wells: ciWells([
        [0.912, 0.905, 0.118, 0.12],
        [0.897, 0.902, 0.118, 0.121],
        [0.881, 0.899, 0.117, 0.12],
        [0.866, 0.896, 0.118, 0.121],
        [0.85, 0.893, 0.118, 0.12],
        [0.835, 0.89, 0.117, 0.121],
      ]),
    },
  },
  'good-tab-bom-crlf.tsv': {
    ok: {
      delimiter: 'tab',
      headerLine: 3,
      metadata: { wavelength_nm: '412' },
      wavelengthNm: 412,
      timesS: [0, 15, 30, 45, 60],
      wells: [
        { well: 'C1', header: 'C1', columnNumber: 2, absorbances: [0.201, 0.236, 0.271, 0.305, 0.34] },
        { well: 'C2', header: 'C2', columnNumber: 3, absorbances: [0.198, 0.231, 0.265, 0.298, 0.332] },
        { well: 'C3', header: 'C3', columnNumber: 4, absorbances: [0.095, 0.095, 0.096, 0.095, 0.096] },
      ],
    },
  },
  'good-unordered-subset.csv': {
    ok: {
      delimiter: 'comma',
      headerLine: 2,
      metadata: {},
      wavelengthNm: null,
      timesS: [0, 12.5, 25],
      wells: [
        { well: 'H12', header: 'H12', columnNumber: 2, absorbances: [0.1, 0.105, 0.11] },
        { well: 'A1', header: 'a1', columnNumber: 3, absorbances: [-0.004, -0.003, -0.002] },
        { well: 'B3', header: 'B03', columnNumber: 4, absorbances: [0.7, 0.69, 0.68] },
        { well: 'C7', header: 'C7', columnNumber: 5, absorbances: [0.65, 0.64, 0.63] },
      ],
    },
  },
  'good-cr-line-endings.csv': {
    ok: {
      delimiter: 'comma',
      headerLine: 2,
      metadata: { wavelength_nm: '550' },
      wavelengthNm: 550,
      timesS: [0, 30, 60],
      wells: [
        { well: 'D4', header: 'D4', columnNumber: 2, absorbances: [0.402, 0.43, 0.458] },
        { well: 'D5', header: 'D5', columnNumber: 3, absorbances: [0.399, 0.401, 0.403] },
      ],
    },
  },

  'bad-empty.csv': { issues: [{ code: 'EMPTY_FILE', row: null, column: null }] },
  'bad-comments-only.csv': { issues: [{ code: 'EMPTY_FILE', row: null, column: null }] },
  'bad-header-only.csv': { issues: [{ code: 'HEADER_ONLY', row: 2 }] },
  'bad-one-reading.csv': { issues: [{ code: 'TOO_FEW_READINGS', row: 1 }] },
  'bad-semicolon.csv': {
    issues: [{ code: 'WRONG_DELIMITER', row: 1, column: null, messageIncludes: 'semicolon' }],
  },
  'bad-space-separated.txt': {
    issues: [{ code: 'WRONG_DELIMITER', row: 2, column: null, messageIncludes: 'spaces' }],
  },
  'bad-mixed-separators.csv': {
    issues: [{ code: 'WRONG_DELIMITER', row: 1, messageIncludes: 'mixes tabs' }],
  },
  'bad-column-count.csv': {
    issues: [{ code: 'COLUMN_COUNT', row: 5, column: 'B2', columnNumber: 5, messageIncludes: 'found 4' }],
  },
  'bad-decimal-comma.csv': {
    issues: [
      { code: 'COLUMN_COUNT', row: 2, column: null, columnNumber: 4, messageIncludes: 'decimal comma' },
      { code: 'COLUMN_COUNT', row: 3, column: null, columnNumber: 4, messageIncludes: 'decimal comma' },
    ],
  },
  'bad-decimal-comma.tsv': {
    issues: [
      { code: 'NOT_A_NUMBER', row: 2, column: 'A1', columnNumber: 2, messageIncludes: 'decimal comma' },
    ],
  },
  'bad-duplicate-well.csv': {
    issues: [{ code: 'DUPLICATE_WELL', row: 1, column: 'B3', columnNumber: 5, messageIncludes: 'column 3' }],
  },
  'bad-duplicate-padded.csv': {
    issues: [{ code: 'DUPLICATE_WELL', row: 1, column: 'a01', columnNumber: 3 }],
  },
  'bad-well-names.csv': {
    issues: [
      { code: 'BAD_WELL_NAME', row: 1, column: 'I1', columnNumber: 3 },
      { code: 'BAD_WELL_NAME', row: 1, column: 'A13', columnNumber: 4 },
      { code: 'BAD_WELL_NAME', row: 1, column: 'blank', columnNumber: 5 },
    ],
  },
  'bad-trailing-separator.csv': {
    issues: [{ code: 'EMPTY_COLUMN_NAME', row: 1, column: null, columnNumber: 4 }],
  },
  'bad-not-a-number.csv': {
    issues: [
      { code: 'NOT_A_NUMBER', row: 4, column: 'A2', columnNumber: 3, messageIncludes: '"OVER"' },
      { code: 'NOT_A_NUMBER', row: 6, column: 'B1', columnNumber: 4, messageIncludes: '"n/a"' },
    ],
  },
  'bad-empty-cell.csv': {
    issues: [{ code: 'EMPTY_CELL', row: 3, column: 'A2', columnNumber: 3 }],
  },
  'bad-time-repeated.csv': {
    issues: [
      { code: 'TIME_NOT_INCREASING', row: 4, column: 'time_s', columnNumber: 1, messageIncludes: 'line 3' },
    ],
  },
  'bad-time-decreasing.csv': {
    issues: [
      { code: 'TIME_NOT_INCREASING', row: 5, column: 'time_s', columnNumber: 1, messageIncludes: 'line 4' },
    ],
  },
  'bad-clock-times.csv': {
    issues: [
      { code: 'NOT_A_NUMBER', row: 2, column: 'time_s', columnNumber: 1, messageIncludes: 'seconds' },
      { code: 'NOT_A_NUMBER', row: 3, column: 'time_s', columnNumber: 1, messageIncludes: 'seconds' },
    ],
  },
  'bad-time-column-name.csv': {
    issues: [{ code: 'BAD_TIME_COLUMN', row: 1, column: 'Time', columnNumber: 1 }],
  },
  'bad-time-not-first.csv': {
    issues: [
      { code: 'BAD_TIME_COLUMN', row: 1, column: 'A1', columnNumber: 1 },
      { code: 'BAD_TIME_COLUMN', row: 1, column: 'time_s', columnNumber: 2 },
    ],
  },
  'bad-comment-after-header.csv': {
    issues: [{ code: 'COMMENT_AFTER_HEADER', row: 3, column: null }],
  },
  'bad-wavelength.csv': {
    issues: [{ code: 'BAD_METADATA', row: 1, messageIncludes: '"UV"' }],
  },
  'bad-binary.bin': { issues: [{ code: 'NOT_TEXT', row: 3, messageIncludes: 'NUL' }] },
  'bad-latin1.csv': { issues: [{ code: 'NOT_TEXT', row: 2, messageIncludes: '0xB5' }] },
  'bad-utf16.csv': { issues: [{ code: 'NOT_TEXT', row: 1, messageIncludes: 'UTF-16' }] },
  // 8 rows x 8 wells of "x": 64 problems, of which the first MAX_PLATE_ISSUES are listed.
  'bad-many-problems.csv': {
    issues: [
      { code: 'NOT_A_NUMBER', row: 2, column: 'A1', columnNumber: 2 },
      { code: 'NOT_A_NUMBER', row: 2, column: 'A2', columnNumber: 3 },
    ],
    totalIssues: 64,
  },
};

function catchImport(fn: () => unknown): PlateImportError {
  try {
    fn();
  } catch (err) {
    if (err instanceof PlateImportError) return err;
    throw err;
  }
  throw new Error('expected a PlateImportError, but the file was accepted');
}

describe('plate file corpus', () => {
  it('when the corpus folder is listed, then every file has exactly one expectation', () => {
    const files = readdirSync(corpusDir).filter((f) => f !== 'README.md');
    expect(files.sort()).toEqual(Object.keys(corpus).sort());
  });

  it('when the README is read, then it describes every corpus file', () => {
    const readme = readFileSync(path.join(corpusDir, 'README.md'), 'utf8');
    for (const file of Object.keys(corpus)) expect(readme).toContain(file);
  });

  const good = Object.entries(corpus).flatMap(([f, e]) => ('ok' in e ? [[f, e.ok] as const] : []));
  const bad = Object.entries(corpus).flatMap(([f, e]) => ('issues' in e ? [[f, e] as const] : []));

  it.each(good)('when %s is parsed, then it reads as written in the file', (file, expected) => {
    // Arrange
    const bytes = readFileSync(path.join(corpusDir, file));
    // Act
    const parsed = parsePlateFile(bytes);
    // Assert
    expect(parsed).toEqual(expected);
    expect(plateParseResultSchema.safeParse(parsed).success).toBe(true);
  });

  it.each(bad)('when %s is parsed, then it is rejected at the expected place', (file, expected) => {
    const bytes = readFileSync(path.join(corpusDir, file));

    const err = catchImport(() => parsePlateFile(bytes));

    const total = expected.totalIssues ?? expected.issues.length;
    expect(err.totalIssues).toBe(total);
    expect(err.issues).toHaveLength(Math.min(total, MAX_PLATE_ISSUES));
    expected.issues.forEach((want, i) => {
      const got = err.issues[i]!;
      expect(got.code).toBe(want.code);
      expect(got.row).toBe(want.row);
      if (want.column !== undefined) expect(got.column).toBe(want.column);
      if (want.columnNumber !== undefined) expect(got.columnNumber).toBe(want.columnNumber);
      if (want.messageIncludes !== undefined) expect(got.message).toContain(want.messageIncludes);
    });
    // Any location the issue names must exist in the file.
    const lineCount = bytes.toString('latin1').split(/\r\n|\r|\n/).length;
    for (const issue of err.issues) {
      if (issue.row !== null) expect(issue.row).toBeLessThanOrEqual(lineCount);
    }
  });

  it('when the same corpus file is given as decoded text, then the result is the same', () => {
    const file = 'good-tab-bom-crlf.tsv';
    const expected = corpus[file];
    if (!expected || !('ok' in expected)) throw new Error(`${file} must be a good file`);
    const text = readFileSync(path.join(corpusDir, file), 'utf8');
    expect(text.charCodeAt(0)).toBe(0xfeff); // Node keeps the BOM when decoding, so the parser must drop it

    expect(parsePlateFile(text)).toEqual(expected.ok);
  });
});
