import { describe, expect, it } from 'vitest';
import type { PlateFormat, PlateIssue } from '@/schemas/plate';
import { PlateImportError } from '../../../../server/domain/plate-import/errors';
import { parseDecimal, parsePlateFile } from '../../../../server/domain/plate-import/parse-plate';

/*
 * Refusals of hand-made bad plate files: which line and column each problem names, and what it says.
 * The product rule (docs/plate-file-format.md, "When a file is refused"): every problem is listed with its line
 * number in the file (1-based) and, where it applies, the column by its header name and its position
 * (1 = the time column); nothing from a refused file is kept. Every line and column number expected below
 * was counted by hand from the file text written beside it.
 * Other sources: ECMAScript StringNumericLiteral (what counts as a plain decimal number) [from memory];
 * ISO 8601 time of day hh:mm[:ss[.fff]] (what a clock time looks like) [from memory]; plate footprints
 * after ANSI/SLAS 4-2004 (24 = A1..D6, 96 = A1..H12, 384 = A1..P24) [from memory].
 */

function issuesOf(text: string, format?: PlateFormat): PlateIssue[] {
  try {
    parsePlateFile(text, format);
  } catch (err) {
    if (err instanceof PlateImportError) return err.issues;
    throw err;
  }
  throw new Error('expected a PlateImportError, but the file was accepted');
}

/** The single issue of a file that has exactly one problem. */
function onlyIssueOf(text: string, format?: PlateFormat): PlateIssue {
  const issues = issuesOf(text, format);
  expect(issues).toHaveLength(1);
  return issues[0]!;
}

describe('numbers', () => {
  it('when the exponent has no sign, then the number is still read (the sign is optional in ECMAScript)', () => {
    // 5e2 = 5 × 10² = 500; 2E3 = 2 × 10³ = 2000; 1.5e+1 = 15.
    expect(parseDecimal('5e2')).toBe(500);
    expect(parseDecimal('2E3')).toBe(2000);
    expect(parseDecimal('1.5e+1')).toBe(15);
  });
});

describe('comment lines above the header', () => {
  it('when a free comment holds "#B:" in mid-line, then it is not taken for a key', () => {
    // Rule 3: a key comment is "# key: value"; here the text after the opening # is "Run notes - …", which is
    // not "key:", so the whole line is free text even though "#B: thawed twice" appears later in it.
    const parsed = parsePlateFile('# Run notes - sample #B: thawed twice\ntime_s,A1\n0,0.9\n10,0.8\n');
    expect(parsed.metadata).toEqual({});
  });

  it('when spaces around the key and colon vary, then the key and its value are read without them', () => {
    // Spacing is layout, not content: "#wavelength_nm:412" (no spaces) and "#   plate_label:   run 12  "
    // (three spaces either side, two after) give wavelength 412 and the label "run 12".
    const parsed = parsePlateFile('#wavelength_nm:412\n#   plate_label:   run 12  \ntime_s,A1\n0,0.9\n10,0.8\n');
    expect(parsed.metadata).toEqual({ wavelength_nm: '412', plate_label: 'run 12' });
    expect(parsed.wavelengthNm).toBe(412);
  });

  it('when comments are indented and blank lines hold only spaces and tabs, then they are skipped above the header', () => {
    // Rule 8: blank lines anywhere are ignored; a line of spaces and tabs is blank. Lines: 1 "  # plate_label: p1",
    // 2 " \t ", 3 header, 4–5 readings. So the header is line 3.
    const parsed = parsePlateFile('  # plate_label: p1\n \t \ntime_s,A1\n0,0.9\n10,0.8\n');
    expect(parsed.headerLine).toBe(3);
    expect(parsed.metadata).toEqual({ plate_label: 'p1' });
  });

  it.each(['0', '-340'])('when wavelength_nm is %s, then it is refused as not positive, on its line', (value) => {
    // Rule 3: wavelength_nm must be a positive number; 0 and -340 are numbers but not positive. Line 2.
    const issue = onlyIssueOf(`# plate_label: p1\n# wavelength_nm: ${value}\ntime_s,A1\n0,0.9\n10,0.8\n`);
    expect(issue).toMatchObject({ code: 'BAD_METADATA', row: 2, column: null });
    expect(issue.message).toBe(`wavelength_nm must be a positive number of nanometres, found "${value}".`);
  });

  it('when there is no header line at all, then the message shows what a header looks like', () => {
    const issue = onlyIssueOf('# plate_label: p1\n\n');
    expect(issue).toMatchObject({ code: 'EMPTY_FILE', row: null });
    expect(issue.message).toContain('"time_s,A1,A2"');
  });
});

describe('the header line', () => {
  it('when the header is aligned with runs of spaces, then the spaces are named as the separator', () => {
    // Rule 5: space separators are refused. Two spaces between columns, as fixed-width exports write them.
    const issue = onlyIssueOf('time_s  A1  A2\n0  0.9  0.8\n');
    expect(issue).toMatchObject({ code: 'WRONG_DELIMITER', row: 1 });
    expect(issue.message).toContain('separated by spaces');
  });

  it.each([
    [96, 'H12'],
    [384, 'P24'],
    [24, 'D6'],
  ] as const)('when a %i-well header has a single column, then the message names the last well %s', (format, last) => {
    // ANSI/SLAS 4-2004: the last well is the last row letter with the last column number.
    const issue = onlyIssueOf('time_s\n0\n10\n', format);
    expect(issue).toMatchObject({ code: 'NO_WELL_COLUMNS', row: 1 });
    expect(issue.message).toBe(
      `The header has a single column; expected time_s followed by well columns (A1 to ${last}), separated by commas or tabs.`,
    );
  });

  it('when the header is "time_s," (a separator but no well), then the unnamed column 2 and the lack of wells are reported', () => {
    // Header cells: "time_s", "" → column 2 has no name; no well column follows the time column.
    const issues = issuesOf('time_s,\n0,\n10,\n');
    expect(issues).toEqual([
      expect.objectContaining({ code: 'EMPTY_COLUMN_NAME', row: 1, column: null, columnNumber: 2 }),
      expect.objectContaining({ code: 'NO_WELL_COLUMNS', row: 1, column: null, columnNumber: null }),
    ]);
    expect(issues[0]!.message).toBe('Column 2 has no name (an extra separator at the end of the line, or two in a row?).');
    expect(issues[1]!.message).toBe('The header has no well columns after the time column.');
  });

  it('when a header with a well ends in a separator, then only the unnamed column 3 is reported', () => {
    // "time_s,A1," → cells time_s (1), A1 (2), "" (3). A1 is a well, so "no well columns" must not be said.
    const issue = onlyIssueOf('time_s,A1,\n0,0.9,\n10,0.8,\n');
    expect(issue).toMatchObject({ code: 'EMPTY_COLUMN_NAME', row: 1, columnNumber: 3 });
    expect(issue.message).toMatch(/^Column 3 has no name/);
  });

  it('when the whole header is one quoted cell, then it is one column: not time_s and no wells', () => {
    // RFC 4180: a quoted cell holding the separator stays one cell, so the header is the single cell
    // "time_s,A1". Readings "0" and "10" then have the one cell the header has.
    const issues = issuesOf('"time_s,A1"\n0\n10\n');
    expect(issues.map((i) => [i.code, i.row, i.column, i.columnNumber])).toEqual([
      ['BAD_TIME_COLUMN', 1, 'time_s,A1', 1],
      ['NO_WELL_COLUMNS', 1, null, null],
    ]);
  });

  it('when the first column is neither a time nor a well, then the refusal has no hint', () => {
    const issue = onlyIssueOf('seconds,A1\n0,0.9\n10,0.8\n');
    expect(issue).toMatchObject({ code: 'BAD_TIME_COLUMN', row: 1, column: 'seconds', columnNumber: 1 });
    expect(issue.message).toBe('The first column must be time_s (seconds), found "seconds".');
  });

  it('when the first column is a time in other words, then the hint asks for seconds in time_s', () => {
    const issue = onlyIssueOf('Time,A1\n0,0.9\n10,0.8\n');
    expect(issue.message).toBe(
      'The first column must be time_s (seconds), found "Time". Times must be in seconds, in a column named time_s.',
    );
  });

  it('when a well comes before time_s, then both columns are named with their own hint', () => {
    // "A1,time_s,A2": A1 is column 1 (must be time_s), time_s is column 2 (must be first only).
    const issues = issuesOf('A1,time_s,A2\n0.9,0,0.8\n0.8,10,0.7\n');
    expect(issues.map((i) => [i.code, i.row, i.column, i.columnNumber])).toEqual([
      ['BAD_TIME_COLUMN', 1, 'A1', 1],
      ['BAD_TIME_COLUMN', 1, 'time_s', 2],
    ]);
    expect(issues[0]!.message).toBe(
      'The first column must be time_s (seconds), found "A1". The time column must come before the wells.',
    );
    expect(issues[1]!.message).toBe('time_s must be the first column only.');
  });

  it('when the first column has no name, then it is named by its position only', () => {
    // ",A1": the first cell is empty, so there is no header name to show; position 1.
    const issue = onlyIssueOf(',A1\n0,0.9\n10,0.8\n');
    expect(issue).toMatchObject({ code: 'BAD_TIME_COLUMN', row: 1, column: null, columnNumber: 1 });
    expect(issue.message).toBe('The first column must be time_s (seconds), found "".');
  });
});

describe('reading lines with the wrong number of cells', () => {
  it('when a comma line lacks its last cell, then the first missing column is named and no hint is given', () => {
    // Header "time_s,A1,A2" has 3 cells. Line 3 "10,0.7" has 2, so the first missing cell is column 3 (A2).
    // The line has no semicolon and no tab, so no separator hint applies.
    const issue = onlyIssueOf('time_s,A1,A2\n0,0.9,0.8\n10,0.7\n20,0.6,0.5\n');
    expect(issue).toMatchObject({ code: 'COLUMN_COUNT', row: 3, column: 'A2', columnNumber: 3 });
    expect(issue.message).toBe('Expected 3 comma-separated cells as in the header (line 1), found 2.');
  });

  it('when a line of a comma file is separated by semicolons, then that is the hint', () => {
    // Lines: 1 "# plate_label: p1", 2 header (3 cells), 3 reading, 4 "10;0.7;0.6" = one cell, so the first
    // missing column is column 2 (A1).
    const issue = onlyIssueOf('# plate_label: p1\ntime_s,A1,A2\n0,0.9,0.8\n10;0.7;0.6\n');
    expect(issue).toMatchObject({ code: 'COLUMN_COUNT', row: 4, column: 'A1', columnNumber: 2 });
    expect(issue.message).toBe(
      'Expected 3 comma-separated cells as in the header (line 2), found 1. The line is separated by semicolons.',
    );
  });

  it('when a line of a tab file is separated by commas, then that is the hint', () => {
    const issue = onlyIssueOf('time_s\tA1\tA2\n0\t0.9\t0.8\n10,0.7,0.6\n');
    expect(issue).toMatchObject({ code: 'COLUMN_COUNT', row: 3, column: 'A1', columnNumber: 2 });
    expect(issue.message).toBe(
      'Expected 3 tab-separated cells as in the header (line 1), found 1. The line is separated by commas.',
    );
  });

  it('when a tab line lacks a cell, then no separator hint is given (the line does use tabs)', () => {
    // "10\t0.7" has 2 cells; column 3 (A2) is the first missing. "10\t0,7" also has 2 cells: its comma is a
    // decimal comma inside a cell, not the separator, so "separated by commas" would be wrong there too.
    const issues = issuesOf('time_s\tA1\tA2\n0\t0.9\t0.8\n10\t0.7\n20\t0,7\n');
    expect(issues).toEqual([
      expect.objectContaining({ code: 'COLUMN_COUNT', row: 3, column: 'A2', columnNumber: 3 }),
      expect.objectContaining({ code: 'COLUMN_COUNT', row: 4, column: 'A2', columnNumber: 3 }),
    ]);
    expect(issues[0]!.message).toBe('Expected 3 tab-separated cells as in the header (line 1), found 2.');
    expect(issues[1]!.message).toBe('Expected 3 tab-separated cells as in the header (line 1), found 2.');
  });

  it('when a tab line is split by tabs, or has no separator at all, then it is not said to use commas or semicolons', () => {
    // Line 3 "10\t0;7": the tab splits it into 2 cells, so it does use the file's separator; the semicolon is
    // inside a cell. Line 4 "20": one cell with no comma in it, so "separated by commas" would be false.
    const issues = issuesOf('time_s\tA1\tA2\n0\t0.9\t0.8\n10\t0;7\n20\n');
    expect(issues.map((i) => [i.code, i.row, i.column, i.columnNumber, i.message])).toEqual([
      ['COLUMN_COUNT', 3, 'A2', 3, 'Expected 3 tab-separated cells as in the header (line 1), found 2.'],
      ['COLUMN_COUNT', 4, 'A1', 2, 'Expected 3 tab-separated cells as in the header (line 1), found 1.'],
    ]);
  });

  it('when a tab line has one cell too many, then the column after the last is named and no hint is given', () => {
    // 4 cells for a 3-cell header: the extra cell is column 4. A decimal comma cannot split cells in a tab
    // file, so that hint does not apply.
    const issue = onlyIssueOf('time_s\tA1\tA2\n0\t0.9\t0.8\n10\t0.7\t0.6\t0.5\n');
    expect(issue).toMatchObject({ code: 'COLUMN_COUNT', row: 3, column: null, columnNumber: 4 });
    expect(issue.message).toBe('Expected 3 tab-separated cells as in the header (line 1), found 4.');
  });

  it('when a comma line is one quoted cell, then it is one cell and not said to be separated by commas', () => {
    // RFC 4180: "10,0.7,0.6" in quotes is one cell holding commas; the file's separator is the comma already.
    const issue = onlyIssueOf('time_s,A1,A2\n0,0.9,0.8\n"10,0.7,0.6"\n');
    expect(issue).toMatchObject({ code: 'COLUMN_COUNT', row: 3, column: 'A1', columnNumber: 2 });
    expect(issue.message).toBe('Expected 3 comma-separated cells as in the header (line 1), found 1.');
  });
});

describe('lines below the header', () => {
  it('when blank lines of spaces and tabs sit between the readings of a tab file, then they are ignored', () => {
    // Rule 8. Lines: 1 header, 2 "\t", 3 reading 0 s, 4 " \t ", 5 reading 10 s.
    const parsed = parsePlateFile('time_s\tA1\n\t\n0\t0.9\n \t \n10\t0.8\n');
    expect(parsed.timesS).toEqual([0, 10]);
    expect(parsed.wells[0]!.absorbances).toEqual([0.9, 0.8]);
  });

  it('when a comment below the header is indented, then it is still a comment out of place, on its line', () => {
    // Rule 3: comments are not allowed below the header. Line 3 is "  # checked".
    const issue = onlyIssueOf('time_s,A1\n0,0.9\n  # checked\n10,0.8\n');
    expect(issue).toMatchObject({ code: 'COMMENT_AFTER_HEADER', row: 3 });
    expect(issue.message).toBe('Comment lines (#) belong above the header; below it every line is a reading.');
  });

  it('when a quoted cell has spaces inside its quotes, then the number inside is read', () => {
    // Rule 7: a cell may be wrapped in double quotes; the padding inside is not part of the number.
    const parsed = parsePlateFile('time_s,A1\n" 0 "," 0.512 "\n10,0.5\n');
    expect(parsed.timesS).toEqual([0, 10]);
    expect(parsed.wells[0]!.absorbances).toEqual([0.512, 0.5]);
  });

  it('when a quote is never closed, then the refusal says so', () => {
    const issue = onlyIssueOf('time_s,A1\n0,0.5\n30,"0.6\n');
    expect(issue).toMatchObject({ code: 'BAD_QUOTING', row: 3 });
    expect(issue.message).toBe(
      'A quoted cell is never closed: a double quote (") opens a cell that runs to the end of the file.',
    );
  });

  it('when the header has a header but no readings, then the header line is named', () => {
    // Lines: 1 comment, 2 header, 3 blank.
    const issue = onlyIssueOf('# plate_label: p1\ntime_s,A1\n\n');
    expect(issue).toMatchObject({ code: 'HEADER_ONLY', row: 2 });
    expect(issue.message).toBe('The file has a header but no readings below it.');
  });

  it('when there is one reading, then the refusal counts 1 reading against the 2 a rate needs', () => {
    // Rule 9: at least two readings; this file has one (line 2).
    const issue = onlyIssueOf('time_s,A1\n0,0.9\n');
    expect(issue).toMatchObject({ code: 'TOO_FEW_READINGS', row: 1 });
    expect(issue.message).toBe('The file has 1 reading; at least 2 are needed to follow a rate.');
  });
});

describe('cells that are not readings', () => {
  it('when the time cell is empty, then the time is said to be missing at column 1', () => {
    // Line 3 ",0.8": the time is empty, A1 is fine. Line 4 (20 s) follows line 2 (0 s), so times still increase.
    const issue = onlyIssueOf('time_s,A1\n0,0.9\n,0.8\n20,0.7\n');
    expect(issue).toMatchObject({ code: 'EMPTY_CELL', row: 3, column: 'time_s', columnNumber: 1 });
    expect(issue.message).toBe('The time is missing.');
  });

  it('when a well cell is empty, then the well is named', () => {
    // Line 3 "10,0.8,": A2 (column 3) is empty.
    const issue = onlyIssueOf('time_s,A1,A2\n0,0.9,0.8\n10,0.8,\n');
    expect(issue).toMatchObject({ code: 'EMPTY_CELL', row: 3, column: 'A2', columnNumber: 3 });
    expect(issue.message).toBe('No reading for well A2.');
  });

  it('when a time is a word, then it is said not to be seconds', () => {
    const issue = onlyIssueOf('time_s,A1\n0,0.9\nlater,0.8\n');
    expect(issue).toMatchObject({ code: 'NOT_A_NUMBER', row: 3, column: 'time_s', columnNumber: 1 });
    expect(issue.message).toBe('Time "later" is not a number of seconds.');
  });

  it.each(['1:30', '12:30', '0:01:30', '0:01:30.25'])(
    'when a time is written as the clock time %s, then it is called a clock time',
    (clock) => {
      // ISO 8601 forms h:mm, hh:mm, h:mm:ss and h:mm:ss with a decimal fraction of the second. Rule 6 names
      // 0:01:30 as what not to write.
      const issue = onlyIssueOf(`time_s,A1\n0,0.9\n${clock},0.8\n`);
      expect(issue).toMatchObject({ code: 'NOT_A_NUMBER', row: 3, columnNumber: 1 });
      expect(issue.message).toBe(`Time "${clock}" is a clock time; write times as seconds (e.g. 90 for 1:30).`);
    },
  );

  it.each([
    ['1.5:30', 'the hour has a fraction'],
    ['12:345', 'the minutes have three digits'],
  ])('when a time is %s (%s), then it is not called a clock time', (cell) => {
    const issue = onlyIssueOf(`time_s,A1\n0,0.9\n${cell},0.8\n`);
    expect(issue.message).toBe(`Time "${cell}" is not a number of seconds.`);
  });

  it('when a well reading looks like a clock time, then it gets the reading message, not the time one', () => {
    const issue = onlyIssueOf('time_s,A1\n0,0.9\n10,1:30\n');
    expect(issue).toMatchObject({ code: 'NOT_A_NUMBER', row: 3, column: 'A1', columnNumber: 2 });
    expect(issue.message).toBe('"1:30" is not a number; every reading must be a decimal number such as 0.512.');
  });

  it('when a tab file has decimal commas, then those cells are named as decimal commas, and a list of numbers is not', () => {
    // Line 2: A1 "-0,004" (sign, zero, comma, digits) and A2 "12,5" (two digits before the comma) are numbers
    // written with a decimal comma; A3 "1,2,3" has two commas, so it is not one number with a decimal comma.
    // Line 3: A1 "OVER", a word.
    const issues = issuesOf('time_s\tA1\tA2\tA3\n0\t-0,004\t12,5\t1,2,3\n10\tOVER\t0.2\t0.3\n');
    expect(issues.map((i) => [i.code, i.row, i.column, i.columnNumber, i.message])).toEqual([
      ['NOT_A_NUMBER', 2, 'A1', 2, '"-0,004" uses a decimal comma; write numbers with a decimal point (e.g. 0.512).'],
      ['NOT_A_NUMBER', 2, 'A2', 3, '"12,5" uses a decimal comma; write numbers with a decimal point (e.g. 0.512).'],
      ['NOT_A_NUMBER', 2, 'A3', 4, '"1,2,3" is not a number; every reading must be a decimal number such as 0.512.'],
      ['NOT_A_NUMBER', 3, 'A1', 2, '"OVER" is not a number; every reading must be a decimal number such as 0.512.'],
    ]);
  });

  it('when a comma file has a quoted decimal comma, then the cell is named as a decimal comma too', () => {
    // RFC 4180: a quoted field may hold the separator, so "0,512" is one cell of a comma file, as a spreadsheet set
    // to a decimal comma writes it. Line 3, column 2 (A1); "1,2,3" in A2 is a list, not one number.
    const issues = issuesOf('time_s,A1,A2\n0,0.9,0.8\n10,"0,512","1,2,3"\n');
    expect(issues.map((i) => [i.code, i.row, i.column, i.columnNumber, i.message])).toEqual([
      ['NOT_A_NUMBER', 3, 'A1', 2, '"0,512" uses a decimal comma; write numbers with a decimal point (e.g. 0.512).'],
      ['NOT_A_NUMBER', 3, 'A2', 3, '"1,2,3" is not a number; every reading must be a decimal number such as 0.512.'],
    ]);
  });

  it('when a comma file has a word for a reading, then it gets the reading message', () => {
    const issue = onlyIssueOf('time_s,A1\n0,0.9\n10,OVER\n');
    expect(issue.message).toBe('"OVER" is not a number; every reading must be a decimal number such as 0.512.');
  });

  it('when a bad cell is over 40 characters, then the message shows its first 40 and an ellipsis', () => {
    // cell41 = "0.5" + 38 × "x" = 41 characters → shown as "0.5" + 37 × "x" (40) + "…".
    // cell40 = "0.5" + 37 × "x" = 40 characters → shown whole, no ellipsis.
    const cell40 = `0.5${'x'.repeat(37)}`;
    const cell41 = `0.5${'x'.repeat(38)}`;
    expect(cell40).toHaveLength(40);
    expect(cell41).toHaveLength(41);
    const issues = issuesOf(`time_s,A1,A2\n0,${cell41},${cell40}\n10,0.8,0.7\n`);
    expect(issues.map((i) => i.message)).toEqual([
      `"${cell40}…" is not a number; every reading must be a decimal number such as 0.512.`,
      `"${cell40}" is not a number; every reading must be a decimal number such as 0.512.`,
    ]);
  });
});

describe('quoting problems name the line where they are', () => {
  it('when a quote opens on line 3 and readings follow, then line 3 is named, not the end of the file', () => {
    // Rule 4: "a quote left open is reported at its line". Lines: 1 header, 2 reading, 3 '30,"0.6' (the quote
    // opens here), 4 and 5 readings, 6 empty after the last line break.
    const issue = onlyIssueOf('time_s,A1\n0,0.5\n30,"0.6\n60,0.7\n90,0.8\n');
    expect(issue).toMatchObject({ code: 'BAD_QUOTING', row: 3 });
  });

  it('when blank lines come before the line with the open quote, then that line is still the one named', () => {
    // Lines: 1 header, 2 reading, 3 blank, 4 "  " (blank), 5 '30,"0.6', 6 reading.
    const issue = onlyIssueOf('time_s,A1\n0,0.5\n\n  \n30,"0.6\n60,0.7\n');
    expect(issue).toMatchObject({ code: 'BAD_QUOTING', row: 5 });
  });

  it('when the header itself opens a quote that is never closed, then the header line is named', () => {
    // Lines: 1 comment, 2 blank, 3 header 'time_s,"A1' (the quote opens here), 4 and 5 readings.
    const issue = onlyIssueOf('# plate_label: p1\n\ntime_s,"A1\n0,0.5\n30,0.6\n');
    expect(issue).toMatchObject({ code: 'BAD_QUOTING', row: 3 });
  });

  it('when text follows a closing quote on line 3, then line 3 is named and the message names no other line', () => {
    // RFC 4180: a quoted cell ends at its closing quote, so '"0.6"x' cannot be read. Lines: 1 header,
    // 2 reading, 3 '30,"0.6"x', 4 reading. The issue's line is 3; a line number inside the message would have
    // to be 3 as well, so the message should carry none (the line is given by the issue itself).
    const issue = onlyIssueOf('time_s,A1\n0,0.5\n30,"0.6"x\n60,0.7\n');
    expect(issue).toMatchObject({ code: 'BAD_QUOTING', row: 3 });
    expect(issue.message).not.toMatch(/line \d/);
    expect(issue.message).toBe(
      'A quoted cell goes on after its closing quote ("): only spaces, the separator or the end of the line may follow it.',
    );
  });
});
