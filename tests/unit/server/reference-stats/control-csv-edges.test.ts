import { describe, expect, it } from 'vitest';
import type { ControlDataUploadResult } from '@/schemas/reference-interval';
import { parseControlCsv } from '../../../../server/domain/reference-stats/control-csv';
import { issuesOf } from '../../../factories/control-csv';

/*
 * The edges of the control-data reader. The format is the one the upload screen states
 * (src/features/reference-intervals/components/control-file-picker.tsx): one row per control subject,
 * specimen_type, age_years, optional control_id and unit, one column per assay (CI … CS), a unit in the header
 * such as "CI (nmol/min/mg)", empty cells "not measured". Sources named per test:
 * - RFC 4180 [confirmed]: comma-separated, header row; a byte-order mark is not part of the data
 *   (Unicode U+FEFF as a signature, The Unicode Standard §23.8 [confirmed]).
 * - Unicode [confirmed]: U+00B5 MICRO SIGN and U+03BC GREEK SMALL LETTER MU both write the micro prefix.
 * - House rule (docs/testing.md, rules): bad input gets a clear error naming the row or column, and nothing
 *   partial is returned.
 * - Ratios X/CS and X/CII, never CS/CS or CII/CII, as used in this field (docs/domain.md §2) [common practice].
 * Every value is invented (demo subjects, no real people).
 */


const lines = (...rows: string[]): string => `${rows.join('\n')}\n`;
const seriesOf = (r: ControlDataUploadResult, specimenType: string, assay: string, measure: string) =>
  r.series.find((s) => s.specimenType === specimenType && s.assay === assay && s.measure === measure);

describe('parseControlCsv: what counts as an empty file or a foreign separator', () => {
  it.each([
    ['nothing at all', ''],
    ['only blank lines and spaces', '\n  \n\r\n'],
    ['only a byte-order mark', '\uFEFF'],
  ])('when the file holds %s, then it is refused as empty', (_, text) => {
    expect(issuesOf(text)).toEqual([{ row: null, column: null, message: 'The file is empty' }]);
  });

  it('when the only non-blank lines hold nothing but commas, then it is refused as empty', () => {
    expect(issuesOf(',,\n , ,\n')).toEqual([{ row: null, column: null, message: 'The file is empty' }]);
  });

  it('when a byte-order mark starts the file, then the first column is still found (Unicode U+FEFF signature [confirmed])', () => {
    const r = parseControlCsv(`\uFEFF${lines('specimen_type,age_years,CI', 'liver,3,12')}`);
    expect(r.subjects).toEqual([{ row: 2, controlId: null, specimenType: 'liver', ageYears: 3, activities: { CI: 12 } }]);
  });

  it('when vertical bars separate the columns, then it says so on row 1', () => {
    expect(issuesOf(lines('specimen_type|age_years|CI', 'liver|3|12'))).toEqual([
      { row: 1, column: null, message: 'The columns are separated by vertical bars; save the file with commas between columns' },
    ]);
  });

  it('when semicolons separate the columns, then the message names semicolons and how to fix it', () => {
    expect(issuesOf(lines('specimen_type;age_years;CI', 'liver;3;12'))).toEqual([
      { row: 1, column: null, message: 'The columns are separated by semicolons; save the file with commas between columns' },
    ]);
  });

  it('when the header is a single word with no separator at all, then the missing columns are named instead', () => {
    expect(issuesOf(lines('specimen_type', 'liver'))).toEqual([
      { row: 1, column: 'age_years', message: 'Missing the age_years column' },
    ]);
  });

  it('when a comma header also holds a semicolon, then the semicolon is named (one cell reads "age_years;CI")', () => {
    expect(issuesOf(lines('specimen_type,age_years;CI', 'liver,3;12'))[0]?.message).toMatch(/separated by semicolons/);
  });
});

describe('parseControlCsv: the header', () => {
  it('when a header cell is empty, then its position is named', () => {
    expect(issuesOf(lines('specimen_type,age_years,,CI', 'liver,3,,12'))).toEqual([
      { row: 1, column: 'column 3', message: 'The header cell is empty: name the column or delete it' },
    ]);
  });

  it('when no assay column is given, then it says which codes it expects', () => {
    expect(issuesOf(lines('specimen_type,age_years,control_id', 'liver,3,demo-01'))).toEqual([
      { row: 1, column: null, message: 'No assay columns; expected some of CI, CII, CIII, CIV, CI+III, CII+III, CS' },
    ]);
  });

  it('when both required columns are missing, then each is named once and no "no assay" message hides them', () => {
    expect(issuesOf(lines('control_id,unit', 'demo-01,nmol/min/mg'))).toEqual([
      { row: 1, column: 'specimen_type', message: 'Missing the specimen_type column' },
      { row: 1, column: 'age_years', message: 'Missing the age_years column' },
    ]);
  });

  it('when a column is unknown, then the message lists every column it could have been', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI,CV', 'liver,3,12,1'))).toEqual([
      {
        row: 1,
        column: 'CV',
        message: 'Unknown column; expected specimen_type, age_years, control_id, unit or an assay code (CI, CII, CIII, CIV, CI+III, CII+III, CS)',
      },
    ]);
  });

  it.each([
    ['age_years', 'Age years'],
    ['specimen_type', 'Specimen-Type'],
    ['unit', ' UNIT '],
    ['control_id', 'control id'],
  ])('when the %s column is written "%s", then it appears twice beside the usual spelling', (usual, variant) => {
    const header = ['specimen_type', 'age_years', 'CI', usual === 'unit' || usual === 'control_id' ? usual : null, variant].filter(Boolean);
    const row = header.map((h) => (h === 'CI' ? '12' : h!.toLowerCase().includes('age') ? '3' : h!.toLowerCase().includes('spec') ? 'liver' : 'x'));
    expect(issuesOf(lines(header.join(','), row.join(',')))).toEqual([
      { row: 1, column: variant.trim(), message: `Appears twice (also as "${usual}")` },
    ]);
  });

  it('reads assay codes in any case and with spaces ("ci + iii"), and a unit in square brackets', () => {
    const r = parseControlCsv(lines('Specimen Type,AGE_YEARS,ci + iii [nmol/min/mg],cs', 'liver,3,12,90'));
    expect(r.assays).toEqual(['CI+III', 'CS']);
    expect(r.unit).toBe('nmol/min/mg');
    expect(r.subjects[0]!.activities).toEqual({ 'CI+III': 12, CS: 90 });
  });

  it('when two header units differ only in case, spacing or the micro character (µ U+00B5 or μ U+03BC), then they are one unit', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI (µmol/min/g),CS [ UMOL / min / G ],CIV (μmol/min/g)', 'liver,3,1,2,3'));
    expect(r.unit).toBe('µmol/min/g');
    expect(r.warnings).toEqual([]);
  });

  it('when the header units really differ, then the later column is named against the first one that gave a unit', () => {
    expect(issuesOf(lines('specimen_type,age_years,CII,CI (nmol/min/mg),CIV (nmol/min/mg),CS (mU/mg)', 'liver,3,1,2,3,4'))).toEqual([
      {
        row: 1,
        column: 'CS (mU/mg)',
        message: 'Mixed units: "mU/mg" here but "nmol/min/mg" in column "CI (nmol/min/mg)"; convert all activities to one unit',
      },
    ]);
  });

  it('when an assay header has empty brackets, then it has no unit and the file is read with a warning', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI ()', 'liver,3,12'));
    expect(r.unit).toBeNull();
    expect(r.assays).toEqual(['CI']);
    expect(r.warnings).toEqual(['The file names no unit; check that every activity is in the same unit before deriving intervals']);
  });
});

describe('parseControlCsv: cells', () => {
  it.each([
    ['12', 12],
    ['+12', 12],
    ['12.', 12],
    ['.5', 0.5],
    ['0', 0],
    ['1e2', 100],
    ['2.5E-1', 0.25],
    [' 7.25 ', 7.25],
  ])('reads the number "%s" as %d', (cell, value) => {
    expect(parseControlCsv(lines('specimen_type,age_years,CI', `liver,3,${cell}`)).subjects[0]!.activities.CI).toBe(value);
  });

  it.each(['1.2.3', '0x10', 'Infinity', '1e400', '12 nmol', '1 2', '--1', '.', 'e5', '5e'])('refuses "%s" as not a number', (cell) => {
    expect(issuesOf(lines('specimen_type,age_years,CI', `liver,3,${cell}`))).toEqual([
      { row: 2, column: 'CI', message: `"${cell}" is not a number` },
    ]);
  });

  it('when an age is written with a decimal comma in quotes, then the message asks for a point', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,"4,5",12'))).toEqual([
      { row: 2, column: 'age_years', message: '"4,5" is not a number: use a point as the decimal separator' },
    ]);
    // Not every comma is a decimal comma: "1,2,3" is just not a number.
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,3,"1,2,3"'))[0]!.message).toBe('"1,2,3" is not a number');
  });

  it('accepts ages 0 and 130 and refuses just outside them, naming the age', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI', 'liver,0,1', 'liver,130,2'));
    expect(r.subjects.map((s) => s.ageYears)).toEqual([0, 130]);
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,-0.01,1', 'liver,130.01,2'))).toEqual([
      { row: 2, column: 'age_years', message: 'Age -0.01 is outside 0–130 years' },
      { row: 3, column: 'age_years', message: 'Age 130.01 is outside 0–130 years' },
    ]);
  });

  it('accepts an activity of 0 and refuses one just below it', () => {
    expect(parseControlCsv(lines('specimen_type,age_years,CI', 'liver,3,0')).subjects[0]!.activities).toEqual({ CI: 0 });
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,3,-0.001'))).toEqual([
      { row: 2, column: 'CI', message: 'Activity -0.001 is negative; activities are 0 or more' },
    ]);
  });

  it('reads a specimen type by its code or its printed label, in any case, with spaces or hyphens', () => {
    const r = parseControlCsv(
      lines('specimen_type,age_years,CI', 'Skeletal muscle,3,1', 'heart-muscle,4,2', ' Cultured skin fibroblasts ,5,3', 'LYMPHOBLASTS,6,4'),
    );
    expect(r.subjects.map((s) => s.specimenType)).toEqual(['skeletal_muscle', 'heart_muscle', 'fibroblasts', 'lymphoblasts']);
    expect(r.specimenTypes).toEqual(['skeletal_muscle', 'heart_muscle', 'fibroblasts', 'lymphoblasts']);
  });

  it('when a specimen type is unknown, then the message lists the codes it accepts', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'kidney,3,1'))).toEqual([
      {
        row: 2,
        column: 'specimen_type',
        message: 'Unknown specimen type "kidney"; expected one of skeletal_muscle, liver, heart_muscle, fibroblasts, lymphoblasts, other',
      },
    ]);
  });

  it('keeps a control id as written, and an empty one as none', () => {
    const r = parseControlCsv(lines('control_id,specimen_type,age_years,CI', ' demo-07 ,liver,3,1', ',liver,4,2'));
    expect(r.subjects.map((s) => s.controlId)).toEqual(['demo-07', null]);
  });

  it('when a row leaves the unit cell empty, then that cell is named', () => {
    expect(issuesOf(lines('specimen_type,age_years,unit,CI', 'liver,3,,1'))).toEqual([{ row: 2, column: 'unit', message: 'Missing unit' }]);
  });

  it('when the unit column agrees with itself across rows (case, spacing, micro sign), then the first row names the unit', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,unit,CI', 'liver,3,µmol/min/g,1', 'liver,4, μmol / MIN / g ,2'));
    expect(r.unit).toBe('µmol/min/g');
  });

  it('when a row has too few cells, then the row and both counts are named with no decimal-comma hint', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI,CS', 'liver,3,12'))).toEqual([
      { row: 2, column: null, message: 'Has 3 cells but the header has 4; check for a stray or missing comma' },
    ]);
  });

  it('when a row has an extra cell but no two neighbours look like the halves of a number, then no decimal-comma hint is given', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,3.5,12,x'))[0]!.message).toBe(
      'Has 4 cells but the header has 3; check for a stray or missing comma',
    );
    // "liver" then "3" is not a split number either: "liver" is not digits; "3" then "x" neither.
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,3,x,y'))[0]!.message).toMatch(/^Has 4 cells but the header has 3; check for a stray or missing comma$/);
    // A first cell of digits has no left neighbour to pair with.
    expect(issuesOf(lines('CI,specimen_type,age_years', '37,x,y,z'))[0]!.message).toMatch(/missing comma$/);
  });

  it('when a row with an extra cell holds a negative number split at a comma ("-37", "5"), then the hint is given', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI', 'liver,x,-37,5'))[0]!.message).toMatch(/decimal comma such as 37,5/);
  });

  it('when a row has several problems, then each is listed and no subject is returned (nothing partial)', () => {
    expect(issuesOf(lines('specimen_type,age_years,CI,CS', ',,abc,-1'))).toEqual([
      { row: 2, column: 'specimen_type', message: 'Missing specimen type' },
      { row: 2, column: 'age_years', message: 'Missing age' },
      { row: 2, column: 'CI', message: '"abc" is not a number' },
      { row: 2, column: 'CS', message: 'Activity -1 is negative; activities are 0 or more' },
    ]);
  });
});

describe('parseControlCsv: the list of problems is capped', () => {
  const header = 'specimen_type,age_years,CI';
  const badRows = (n: number) => Array.from({ length: n }, () => 'liver,999,1');

  it('when exactly 200 problems are found, then all 200 are listed and nothing more is said', () => {
    const issues = issuesOf(lines(header, ...badRows(200)));
    expect(issues).toHaveLength(200);
    expect(issues[199]).toEqual({ row: 201, column: 'age_years', message: 'Age 999 is outside 0–130 years' });
  });

  it('when 201 or 250 problems are found, then 200 are listed and the rest counted', () => {
    const one = issuesOf(lines(header, ...badRows(201)));
    expect(one).toHaveLength(201);
    expect(one[200]).toEqual({ row: null, column: null, message: '1 more problem(s) not listed' });
    const fifty = issuesOf(lines(header, ...badRows(250)));
    expect(fifty).toHaveLength(201);
    expect(fifty[199]!.row).toBe(201);
    expect(fifty[200]).toEqual({ row: null, column: null, message: '50 more problem(s) not listed' });
  });
});

describe('parseControlCsv: units and warnings of a good file', () => {
  it('when a unit column and a header unit agree, then the header names the unit; where they disagree the row is named', () => {
    const ok = parseControlCsv(lines('specimen_type,age_years,unit,CI (nmol/min/mg)', 'liver,3,NMOL/MIN/MG,1'));
    expect(ok.unit).toBe('nmol/min/mg');
    expect(issuesOf(lines('specimen_type,age_years,unit,CI (nmol/min/mg)', 'liver,3,nmol/min/mg,1', 'liver,4,mU/mg,2'))).toEqual([
      {
        row: 3,
        column: 'unit',
        message: 'Mixed units: "mU/mg" here but "nmol/min/mg" in the header of column "CI (nmol/min/mg)"; convert all activities to one unit',
      },
    ]);
  });

  it('when rows carry no activity at all, then they are named in a warning, and the file is still read', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI (nmol/min/mg),CS', 'liver,3,,', 'liver,4,1,2', 'liver,5,,'));
    expect(r.rowCount).toBe(3);
    expect(r.warnings).toEqual(['Row(s) 2, 4 have no activity values']);
  });

  it('when CS or CII is 0, then those rows leave out only the ratios to it, each row named once in row order', () => {
    // Row 2 (fibroblasts) and row 3 (muscle) have CS = 0; row 4 has CII = 0. Invented values.
    const r = parseControlCsv(
      lines(
        'specimen_type,age_years,CI,CII,CIV,CS (nmol/min/mg)',
        'fibroblasts,3,10,20,30,0',
        'skeletal_muscle,4,11,22,33,0',
        'skeletal_muscle,5,12,0,36,60',
        'skeletal_muscle,6,13,26,39,65',
      ),
    );
    expect(r.warnings).toEqual([
      'CS is 0 in row(s) 2, 3; ratios to CS left out for those rows',
      'CII is 0 in row(s) 4; ratios to CII left out for those rows',
    ]);
    // CI/CS from rows 4 and 5 only (12/60, 13/65); CI/CII from rows 3 and 5 (11/22, 13/26).
    expect(seriesOf(r, 'skeletal_muscle', 'CI', 'ratio_cs')!.points).toEqual([
      { row: 4, ageYears: 5, value: 0.2 },
      { row: 5, ageYears: 6, value: 0.2 },
    ]);
    expect(seriesOf(r, 'skeletal_muscle', 'CI', 'ratio_cii')!.points).toEqual([
      { row: 3, ageYears: 4, value: 0.5 },
      { row: 5, ageYears: 6, value: 0.5 },
    ]);
    // Activities keep every row, zeros included.
    expect(seriesOf(r, 'skeletal_muscle', 'CII', 'activity')!.points.map((p) => p.value)).toEqual([22, 0, 26]);
    // A fibroblast CI/CS series would hold only row 2, whose CS is 0: none is made.
    expect(seriesOf(r, 'fibroblasts', 'CI', 'ratio_cs')).toBeUndefined();
    expect(seriesOf(r, 'fibroblasts', 'CI', 'ratio_cii')!.points).toEqual([{ row: 2, ageYears: 3, value: 0.5 }]);
  });

  it('makes X/CS for every complex and X/CII for every complex but CII, in assay then measure order, none for CS', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CS,CII+III,CI+III,CIV,CIII,CII,CI', 'liver,3,100,7,6,5,4,2,1'));
    expect(r.assays).toEqual(['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS']);
    expect(r.series.map((s) => `${s.assay} ${s.measure}`)).toEqual([
      'CI activity',
      'CI ratio_cs',
      'CI ratio_cii',
      'CII activity',
      'CII ratio_cs',
      'CIII activity',
      'CIII ratio_cs',
      'CIII ratio_cii',
      'CIV activity',
      'CIV ratio_cs',
      'CIV ratio_cii',
      'CI+III activity',
      'CI+III ratio_cs',
      'CI+III ratio_cii',
      'CII+III activity',
      'CII+III ratio_cs',
      'CII+III ratio_cii',
      'CS activity',
    ]);
    expect(seriesOf(r, 'liver', 'CIV', 'ratio_cii')!.points[0]!.value).toBe(2.5);
    expect(seriesOf(r, 'liver', 'CII+III', 'ratio_cs')!.points[0]!.value).toBe(0.07);
  });

  it('when a subject lacks the denominator, then it is left out of that ratio without a warning', () => {
    const r = parseControlCsv(lines('specimen_type,age_years,CI,CS (nmol/min/mg)', 'liver,3,10,', 'liver,4,12,60'));
    expect(seriesOf(r, 'liver', 'CI', 'ratio_cs')!.points).toEqual([{ row: 3, ageYears: 4, value: 0.2 }]);
    expect(r.warnings).toEqual([]);
  });
});
