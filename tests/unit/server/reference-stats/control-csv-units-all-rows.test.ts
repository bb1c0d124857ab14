import { describe, expect, it } from 'vitest';
import { issuesOf } from '../../../factories/control-csv';

/*
 * The reader promises to list every problem by row and column in one go (server/domain/reference-stats/control-csv.ts,
 * parseControlCsv; house rule in docs/testing.md: bad input gets a clear error naming the row or column). A row
 * with a bad value still states its unit, so a unit that disagrees with the rest is a problem of its own and is
 * listed with the bad value, not only after the user has fixed the value and uploaded again. Invented values.
 */
const lines = (...rows: string[]): string => `${rows.join('\n')}\n`;

describe('the unit of a row that has another problem is still checked', () => {
  it('a row with a bad activity and a different unit gets both problems listed', () => {
    expect(issuesOf(lines('specimen_type,age_years,unit,CI', 'liver,3,nmol/min/mg,1', 'liver,4,mU/mg,abc'))).toEqual([
      { row: 3, column: 'CI', message: '"abc" is not a number' },
      { row: 3, column: 'unit', message: 'Mixed units: "mU/mg" here but "nmol/min/mg" in row 2; convert all activities to one unit' },
    ]);
  });

  it('a row with a missing specimen type and an age out of range still names its unit against the header’s', () => {
    expect(issuesOf(lines('specimen_type,age_years,unit,CI (nmol/min/mg)', ',200,mU/mg,1'))).toEqual([
      { row: 2, column: 'specimen_type', message: 'Missing specimen type' },
      { row: 2, column: 'age_years', message: 'Age 200 is outside 0–130 years' },
      {
        row: 2,
        column: 'unit',
        message: 'Mixed units: "mU/mg" here but "nmol/min/mg" in the header of column "CI (nmol/min/mg)"; convert all activities to one unit',
      },
    ]);
  });

  it('a row with an empty unit cell is named for it and gives no unit to compare the later rows with', () => {
    expect(issuesOf(lines('specimen_type,age_years,unit,CI', 'liver,3,,1', 'liver,4,nmol/min/mg,2', 'liver,5,mU/mg,3'))).toEqual([
      { row: 2, column: 'unit', message: 'Missing unit' },
      { row: 4, column: 'unit', message: 'Mixed units: "mU/mg" here but "nmol/min/mg" in row 3; convert all activities to one unit' },
    ]);
  });

  it('a row with the wrong number of cells gives no unit: its cells may be shifted', () => {
    expect(issuesOf(lines('specimen_type,age_years,unit,CI', 'liver,3,mU/mg,1,5', 'liver,4,nmol/min/mg,2'))).toEqual([
      { row: 2, column: null, message: 'Has 5 cells but the header has 4; check for a stray or missing comma; a decimal comma such as 37,5 splits a value in two: use a point (37.5)' },
    ]);
  });
});
