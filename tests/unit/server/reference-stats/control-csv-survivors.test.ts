import { describe, expect, it } from 'vitest';
import { parseControlCsv } from '../../../../server/domain/reference-stats/control-csv';
import { issuesOf } from '../../../factories/control-csv';

/*
 * Edges of the control-data reader that earlier tests left open. The format is the one the upload screen states
 * (src/features/reference-intervals/components/control-file-picker.tsx): specimen_type, age_years, optional
 * control_id and unit, one column per assay (CI … CS), a unit in the header such as "CI (nmol/min/mg)".
 * Sources named per test:
 * - Decimal numbers: a fraction may start at the point (".25") and an exponent may have several digits
 *   ("125e-2" = 1.25) — the decimal literal forms of ECMA-262 NumericLiteral grammar [from memory].
 * - Unicode §23.8 [confirmed]: U+FEFF at the very start of a file is a signature (byte-order mark); anywhere else it
 *   is ZERO WIDTH NO-BREAK SPACE, part of the text.
 * - House rule (docs/testing.md): bad input gets a clear error naming the row or column; a hint is given only where
 *   it fits (a decimal comma such as 37,5, [common practice] in the locales that write one).
 * Every value is invented (demo subjects).
 */
const lines = (...rows: string[]): string => `${rows.join('\n')}\n`;
const ci = (cell: string) => parseControlCsv(lines('specimen_type,age_years,CI', `liver,3,${cell}`)).subjects[0]!.activities.CI;

describe('numbers: the decimal forms a spreadsheet writes', () => {
  it('a fraction with no leading digit and several after the point: ".25" is 0.25', () => {
    expect(ci('.25')).toBe(0.25);
  });
  it('an exponent of several digits: "125e-2" is 1.25 and "1.5e10" is 15 000 000 000', () => {
    expect(ci('125e-2')).toBe(1.25);
    expect(ci('1.5e10')).toBe(15_000_000_000);
  });
});

describe('a decimal comma gets the hint only when the cell is one number written with a comma', () => {
  it('a signed value with two decimals, "-37,25", gets the hint', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,3,"-37,25"'))).toEqual([
      { row: 2, column: 'CI', message: '"-37,25" is not a number: use a point as the decimal separator' },
    ]);
  });
  it('an age of "+4,75" gets it too, on the age column', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,"+4,75",12'))).toEqual([
      { row: 2, column: 'age_years', message: '"+4,75" is not a number: use a point as the decimal separator' },
    ]);
  });
});

describe('header names', () => {
  it('a run of spaces or hyphens inside a column name reads as one separator ("Age  years", "specimen - type")', () => {
    const r = parseControlCsv(lines('specimen - type,Age  years,CI', 'Heart -  muscle,3,12'));
    expect(r.subjects).toEqual([{ row: 2, controlId: null, specimenType: 'heart_muscle', ageYears: 3, activities: { CI: 12 } }]);
  });

  it('a unit written straight after the code, "CI(nmol/min/mg)", is read as the unit', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI(nmol/min/mg)', 'liver,3,12'));
    expect(r.assays).toEqual(['CI']);
    expect(r.unit).toBe('nmol/min/mg');
  });

  it('spaces inside the brackets are not part of the unit: "CI ( nmol/min/mg )" names nmol/min/mg', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI ( nmol/min/mg )', 'liver,3,12'));
    expect(r.unit).toBe('nmol/min/mg');
  });

  it('brackets with only spaces give no unit, and the file is read with the no-unit warning', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI (  )', 'liver,3,12'));
    expect(r.unit).toBeNull();
    expect(r.warnings).toEqual(['The file names no unit; check that every activity is in the same unit before deriving intervals']);
  });

  it('words after the unit make the column unknown, named as written', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI (nmol/min/mg) mean', 'liver,3,12'))).toEqual([
      {
        row: 1,
        column: 'CI (nmol/min/mg) mean',
        message: 'Unknown column; expected specimen_type, age_years, control_id, unit or an assay code (CI, CII, CIII, CIV, CI+III, CII+III, CS)',
      },
    ]);
  });

  it('words before the code make the column unknown on one line and across a line break in the cell alike', () => {
    // A spreadsheet cell may hold a line break (RFC 4180 quoted field [confirmed]); "Mean CI (…)" is not a code.
    for (const cell of ['Mean CI (nmol/min/mg)', '"Mean\nCI (nmol/min/mg)"']) {
      const issues = issuesOf(lines(`specimen_type,age_years,${cell}`, 'liver,3,12'));
      expect(issues).toHaveLength(1);
      expect(issues[0]).toMatchObject({ row: 1, message: expect.stringMatching(/^Unknown column;/) });
      expect(issues[0]!.column).toMatch(/^Mean\s+CI \(nmol\/min\/mg\)$/);
    }
  });
});

describe('the decimal-comma hint on a row with an extra cell', () => {
  it('two neighbours of several digits, "37" and "25", get the hint', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,x,37,25'))[0]!.message).toBe(
      'Has 4 cells but the header has 3; check for a stray or missing comma; a decimal comma such as 37,5 splits a value in two: use a point (37.5)',
    );
  });
  it.each([
    ['a right neighbour that starts with a letter', 'liver,3,x7,y'],
    ['a right neighbour that ends with a letter', 'liver,3,7x,y'],
  ])('%s is not the second half of a number: no hint', (_, row) => {
    expect(issuesOf(lines('specimen_type,age_years,CI', row))[0]!.message).toBe(
      'Has 4 cells but the header has 3; check for a stray or missing comma',
    );
  });
});

describe('a byte-order mark is removed only at the very start (Unicode §23.8)', () => {
  it('a U+FEFF inside a control id is kept as written', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,control_id,CI', 'liver,3,demo\uFEFF01,12'));
    expect(r.subjects[0]!.controlId).toBe('demo\uFEFF01');
  });
});
