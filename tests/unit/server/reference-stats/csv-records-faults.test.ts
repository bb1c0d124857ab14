import { CsvError } from 'csv-parse/sync';
import { afterEach, describe, expect, it, vi } from 'vitest';

/*
 * The reader's answer when csv-parse fails in a way a file cannot provoke with the options used (relaxed quotes
 * and column counts leave only an unclosed quote): the parser is made to throw, a fault injected for real.
 * House rule (docs/testing.md): bad input gets a clear error naming where it can; anything else is not hidden.
 */

const failure: { error: unknown } = { error: null };

vi.mock('csv-parse/sync', async (importOriginal) => {
  const original = await importOriginal<typeof import('csv-parse/sync')>();
  return {
    ...original,
    parse: (...args: Parameters<typeof original.parse>) => {
      if (failure.error) throw failure.error;
      return original.parse(...args);
    },
  };
});

const { splitCsvRecords } = await import('../../../../server/domain/reference-stats/csv-records');

afterEach(() => {
  failure.error = null;
});

describe('splitCsvRecords when the CSV library fails', () => {
  it('when csv-parse reports another CSV problem, then the issue carries its message and names no row', () => {
    failure.error = new CsvError('CSV_INVALID_ARGUMENT', 'Invalid argument: demo fault');
    expect(splitCsvRecords('a,b\n1,2\n')).toEqual({
      issue: { row: null, column: null, message: 'The file cannot be read as CSV: Invalid argument: demo fault' },
    });
  });

  it('when csv-parse reports an unclosed quote after two complete records, then the third record is named', () => {
    failure.error = Object.assign(new CsvError('CSV_QUOTE_NOT_CLOSED', 'Quote Not Closed'), { records: 2 });
    expect(splitCsvRecords('a,b\n1,2\n"x')).toEqual({ issue: { row: 3, column: null, message: 'A quoted cell is never closed' } });
  });

  it('when something other than a CSV problem is thrown, then it is not dressed up as a file problem', () => {
    const bug = Object.assign(new TypeError('demo fault'), { code: 'CSV_QUOTE_NOT_CLOSED' });
    failure.error = bug;
    expect(() => splitCsvRecords('a,b\n')).toThrow(bug);
  });
});
