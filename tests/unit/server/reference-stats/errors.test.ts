import { describe, expect, it } from 'vitest';
import { ControlCsvError, ReferenceStatsInputError } from '../../../../server/domain/reference-stats/errors';

/*
 * Bad input gets a clear 400 that names the field, row or column [house rule, docs/testing.md]. The summary
 * line of a control-data file error leads with the first problem's place and counts the rest.
 */

describe('ControlCsvError', () => {
  it('names row and column of the first problem and counts the others', () => {
    const e = new ControlCsvError([
      { row: 4, column: 'CI', message: 'not a number' },
      { row: 5, column: 'CS', message: 'empty' },
      { row: 9, column: null, message: 'too many cells' },
    ]);
    expect(e.message).toBe('row 4, column "CI": not a number (and 2 more problem(s))');
    expect(e.issues).toHaveLength(3);
    expect(e.status).toBe(400);
    expect(e.code).toBe('VALIDATION_FAILED');
    expect(e.name).toBe('ControlCsvError');
  });

  it('a problem with only a row, only a column, or neither', () => {
    expect(new ControlCsvError([{ row: 3, column: null, message: 'A quoted cell is never closed' }]).message).toBe(
      'row 3: A quoted cell is never closed',
    );
    expect(new ControlCsvError([{ row: null, column: 'age_years', message: 'missing' }]).message).toBe(
      'column "age_years": missing',
    );
    expect(new ControlCsvError([{ row: null, column: null, message: 'The file is empty' }]).message).toBe('The file is empty');
  });

  it('no issues at all still gives a sentence', () => {
    expect(new ControlCsvError([]).message).toBe('The control-data file could not be read');
  });
});

describe('ReferenceStatsInputError', () => {
  it('carries its field, a 400 status and the field errors the HTTP layer sends', () => {
    const e = new ReferenceStatsInputError('values', 'too few');
    expect(e.field).toBe('values');
    expect(e.status).toBe(400);
    expect(e.code).toBe('VALIDATION_FAILED');
    expect(e.name).toBe('ReferenceStatsInputError');
    expect(e.fieldErrors).toEqual({ values: ['too few'] });
  });
});
