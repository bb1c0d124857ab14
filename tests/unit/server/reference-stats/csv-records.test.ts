import { describe, expect, it } from 'vitest';
import { isBlankRecord, splitCsvRecords } from '../../../../server/domain/reference-stats/csv-records';

/*
 * The record splitter under the control-data reader, now csv-parse. Expectations from RFC 4180 (Common Format
 * and MIME Type for CSV Files) [confirmed]: fields with commas, quotes or line breaks are enclosed in double
 * quotes, and a double quote inside one is written twice. Row numbers count records with the header as row 1.
 */
describe('splitCsvRecords', () => {
  it('reads quoted commas, doubled quotes and a quoted line break, numbering records not lines', () => {
    const text = 'id,CI\r\n"a,1",10\n"say ""hi""",11\n"two\nlines",12\n';
    const out = splitCsvRecords(text);
    expect(out).toEqual({
      records: [
        { row: 1, cells: ['id', 'CI'] },
        { row: 2, cells: ['a,1', '10'] },
        { row: 3, cells: ['say "hi"', '11'] },
        { row: 4, cells: ['two\nlines', '12'] },
      ],
    });
  });

  it('takes CRLF, LF and CR line ends in one file and keeps blank lines as blank records (row numbers stay)', () => {
    // [common practice] spreadsheets on different systems end lines differently; a blank line is a record.
    const out = splitCsvRecords('id,CI\r\nx,1\ry,2\n\nz,3');
    if (!('records' in out)) throw new Error('expected records');
    expect(out.records.map((r) => [r.row, r.cells])).toEqual([
      [1, ['id', 'CI']],
      [2, ['x', '1']],
      [3, ['y', '2']],
      [4, ['']],
      [5, ['z', '3']],
    ]);
    expect(out.records.map(isBlankRecord)).toEqual([false, false, false, true, false]);
  });

  it('keeps rows of different lengths for the caller to name, and a stray quote inside a cell as a character', () => {
    const out = splitCsvRecords('a,b\n1,2,3\nx"y,4');
    expect(out).toEqual({
      records: [
        { row: 1, cells: ['a', 'b'] },
        { row: 2, cells: ['1', '2', '3'] },
        { row: 3, cells: ['x"y', '4'] },
      ],
    });
  });

  it('names the record where a quote opens and is never closed', () => {
    expect(splitCsvRecords('a,b\n1,2\n"open,3\n4,5')).toEqual({
      issue: { row: 3, column: null, message: 'A quoted cell is never closed' },
    });
  });
});

describe('isBlankRecord', () => {
  it('counts a record whose cells hold only spaces, tabs or no-break spaces as blank, and one with any text as not', () => {
    // ECMA-262 WhiteSpace, as String.prototype.trim [confirmed]. (csv-parse's ltrim already empties such cells in
    // files; the helper keeps the rule for any record it is given.)
    expect(isBlankRecord({ row: 1, cells: [' ', '\t', '\u00a0', ''] })).toBe(true);
    expect(isBlankRecord({ row: 1, cells: ['\u00a0', ' x '] })).toBe(false);
  });
});
