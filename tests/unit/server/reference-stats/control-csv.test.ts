import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { controlDataUploadResultSchema, type ControlCsvIssue } from '@/schemas/reference-interval';
import { parseControlCsv } from '../../../../server/domain/reference-stats/control-csv';
import { issuesOf } from '../../../factories/control-csv';

// Fixtures are invented control subjects ("demo-NN"); no real people or laboratories.
function fixture(name: string): string {
  return readFileSync(new URL(`../../../fixtures/controls/${name}`, import.meta.url), 'utf8');
}


describe('parseControlCsv: a good file', () => {
  // Read in beforeAll, not while the file is collected, so that a throw fails these tests (docs/testing.md).
  let result: ReturnType<typeof parseControlCsv>;
  beforeAll(() => {
    result = parseControlCsv(fixture('valid-header-units.csv'));
  });

  it('reads every subject with its row number, specimen type (code or label) and age', () => {
    expect(controlDataUploadResultSchema.parse(result)).toEqual(result);
    expect(result.rowCount).toBe(5);
    expect(result.unit).toBe('nmol/min/mg');
    expect(result.specimenTypes).toEqual(['skeletal_muscle', 'fibroblasts']);
    expect(result.assays).toEqual(['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS']);
    // Row 6 of the file is blank; the quoted id on row 7 loses its quotes.
    expect(result.subjects.map((s) => [s.row, s.controlId, s.specimenType, s.ageYears])).toEqual([
      [2, 'demo-01', 'skeletal_muscle', 4.5],
      [3, 'demo-02', 'skeletal_muscle', 12],
      [4, 'demo-03', 'skeletal_muscle', 35],
      [5, 'demo-04', 'fibroblasts', 0.8],
      [7, 'demo-05', 'fibroblasts', 7],
    ]);
    // Empty cells are "not measured", not zero.
    expect(result.subjects[2]?.activities.CII).toBeUndefined();
  });

  it('builds activity series and ratios to CS and to CII from the file values', () => {
    const find = (assay: string, measure: string) =>
      result.series.find((s) => s.specimenType === 'skeletal_muscle' && s.assay === assay && s.measure === measure);
    expect(find('CI', 'activity')?.points.map((p) => p.value)).toEqual([20, 30, 25]);
    // CI/CS: 20/100 and 30/150; row 4 has CS = 0 and is left out of ratios to CS.
    expect(find('CI', 'ratio_cs')?.points.map((p) => [p.row, p.value])).toEqual([
      [2, 0.2],
      [3, 0.2],
    ]);
    // CI/CII: 20/40 = 0.5 and 30/45; row 4 has no CII.
    const cii = find('CI', 'ratio_cii')?.points ?? [];
    expect(cii.map((p) => p.row)).toEqual([2, 3]);
    expect(cii[0]?.value).toBeCloseTo(0.5, 12);
    expect(cii[1]?.value).toBeCloseTo(30 / 45, 12);
    // No CS/CS, no CII/CII and no CS/CII series.
    expect(find('CS', 'ratio_cs')).toBeUndefined();
    expect(find('CII', 'ratio_cii')).toBeUndefined();
    expect(find('CS', 'ratio_cii')).toBeUndefined();
    expect(find('CII', 'ratio_cs')?.points.map((p) => p.value)).toEqual([0.4, 0.3]);
    expect(result.warnings.join(' ')).toMatch(/CS is 0 in row\(s\) 4/);
  });

  it('reads a unit column and CRLF line ends, treating spacing differences in a unit as the same unit', () => {
    const r = parseControlCsv(fixture('valid-unit-column.csv'));
    expect(r.unit).toBe('nmol/min/mg');
    expect(r.subjects.map((s) => s.activities)).toEqual([
      { CI: 10.5, CIV: 30, CS: 80 },
      { CI: 11, CIV: 33, CS: 88 },
    ]);
  });
});

describe('parseControlCsv: refused files name the row and column', () => {
  const cases: [string, string, Partial<ControlCsvIssue>[]][] = [
    ['an empty file', 'empty.csv', [{ row: null, column: null, message: 'The file is empty' }]],
    ['a header without data', 'header-only.csv', [{ row: null, message: expect.stringMatching(/no data rows/) }]],
    ['semicolons between columns', 'semicolon-delimited.csv', [{ row: 1, message: expect.stringMatching(/separated by semicolons/) }]],
    ['tabs between columns', 'tab-delimited.csv', [{ row: 1, message: expect.stringMatching(/separated by tabs/) }]],
    [
      'non-numeric cells',
      'non-numeric.csv',
      [
        { row: 3, column: 'CI', message: '"abc" is not a number' },
        { row: 4, column: 'CI', message: expect.stringMatching(/"21,5".*decimal separator/) },
      ],
    ],
    ['a negative activity', 'negative-activity.csv', [{ row: 3, column: 'CIV', message: expect.stringMatching(/negative/) }]],
    ['a missing specimen type', 'missing-specimen-type.csv', [{ row: 3, column: 'specimen_type', message: 'Missing specimen type' }]],
    [
      'no specimen_type column',
      'missing-specimen-column.csv',
      [{ row: 1, column: 'specimen_type', message: expect.stringMatching(/Missing the specimen_type column/) }],
    ],
    [
      'an unknown specimen type',
      'unknown-specimen-type.csv',
      [{ row: 3, column: 'specimen_type', message: expect.stringMatching(/Unknown specimen type "kidney"/) }],
    ],
    [
      'mixed units in the header',
      'mixed-units-header.csv',
      [{ row: 1, column: 'CS [mU/g tissue]', message: expect.stringMatching(/Mixed units.*"nmol\/min\/mg" in column "CI \(nmol\/min\/mg\)"/) }],
    ],
    [
      'mixed units in the unit column',
      'mixed-units-column.csv',
      [{ row: 4, column: 'unit', message: expect.stringMatching(/Mixed units: "mU\/g tissue" here but "nmol\/min\/mg" in row 2/) }],
    ],
    [
      'a unit column that contradicts the header',
      'mixed-units-header-vs-column.csv',
      [{ row: 2, column: 'unit', message: expect.stringMatching(/"mU\/mg" here but "nmol\/min\/mg" in the header/) }],
    ],
    ['an unknown column', 'unknown-column.csv', [{ row: 1, column: 'CV', message: expect.stringMatching(/Unknown column/) }]],
    ['a column given twice', 'duplicate-column.csv', [{ row: 1, column: 'ci', message: 'Appears twice (also as "CI")' }]],
    ['a row with an extra cell', 'ragged-row.csv', [{ row: 3, column: null, message: expect.stringMatching(/Has 5 cells but the header has 4/) }]],
    ['a quote never closed', 'unclosed-quote.csv', [{ row: 3, column: null, message: 'A quoted cell is never closed' }]],
    [
      'several problems at once',
      'several-problems.csv',
      [
        { row: 2, column: 'age_years', message: 'Missing age' },
        { row: 3, column: 'age_years', message: expect.stringMatching(/Age 200 is outside/) },
        { row: 4, column: 'CI', message: '"n/a" is not a number' },
        { row: 4, column: 'CS', message: expect.stringMatching(/negative/) },
      ],
    ],
  ];

  it.each(cases)('when the file has %s (%s), then it throws ControlCsvError with those issues', (_, file, expected) => {
    const issues = issuesOf(fixture(file));
    expect(issues).toHaveLength(expected.length);
    expected.forEach((issue, i) => expect(issues[i]).toMatchObject(issue));
  });

  it('when an unquoted decimal comma splits a value into two cells, then the row is refused and the message says why', () => {
    // Invented subject; "37,5" written by a comma-decimal spreadsheet without quotes becomes cells "37" and "5".
    const issues = issuesOf('specimen_type,age_years,CI\nskeletal_muscle,8,37,5\n');
    expect(issues).toEqual([
      { row: 2, column: null, message: expect.stringMatching(/Has 4 cells but the header has 3.*decimal comma such as 37,5.*use a point/) },
    ]);
  });

  it('puts the first problem, with its row and column, in the error message', () => {
    expect(() => parseControlCsv(fixture('negative-activity.csv'))).toThrow(/^row 3, column "CIV": Activity -3.2 is negative/);
  });
});
