import { parse as parseCsv, CsvError } from 'csv-parse/sync';
import {
  describeWellRange,
  MIN_PLATE_READINGS,
  normaliseWellIdFor,
  plateDimensions,
  plateRowsOf,
  PLATE_TIME_COLUMN,
  type ParsedWell,
  type PlateDelimiter,
  type PlateFormat,
  type PlateParseResult,
} from '@/schemas/plate';
import { decodePlateText } from './decode-text';
import { IssueList } from './errors';

/*
 * Reads a Cristae kinetic plate file (docs/plate-file-format.md):
 *   # optional comment lines, "# key: value" kept as metadata
 *   time_s,A1,A2,...        header: time column first, then one column per well
 *   0,0.812,0.797,...        one row per reading: seconds, then absorbances
 * Comma or tab, chosen from the header line. Cells are read by csv-parse (RFC 4180 quoting); lines and the
 * comment block are found here so that every problem names its line. Every problem found is reported at once.
 */

const NUMBER_PATTERN = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const METADATA_PATTERN = /^#\s*([A-Za-z][A-Za-z0-9_.-]*)\s*:\s*(.*?)\s*$/;
const CLOCK_PATTERN = /^\d{1,2}:\d{2}(?::\d{2}(?:\.\d+)?)?$/;
const DECIMAL_COMMA_PATTERN = /^[+-]?\d*,\d+$/;

const delimiterChar: Record<PlateDelimiter, string> = { comma: ',', tab: '\t' };
const delimiterName: Record<PlateDelimiter, string> = { comma: 'comma', tab: 'tab' };

/** Splits text into lines; CR LF, LF and a lone CR each end a line. */
function splitLines(text: string): string[] {
  return text.split(/\r\n|\r|\n/);
}

type CsvRecord = { row: number; cells: string[] };

/**
 * Reads the cells of `lines` (the file from `firstRow` on) with csv-parse: quoted cells may hold the separator
 * ("" inside stands for "), cells are trimmed, blank lines skipped. Each record keeps its 1-based line number.
 * An unclosed quote is reported at the line where it opens and ends the reading.
 */
function readCsvRecords(lines: string[], firstRow: number, delimiter: PlateDelimiter, issues: IssueList): CsvRecord[] {
  // One line ending for csv-parse; whitespace-only lines become empty so that they are skipped like blank ones.
  const csvLines = lines.map((l) => (l.trim() === '' ? '' : l));
  // The line (of csvLines, from 1) on which the last whole record ended.
  let lastRecordLine = 0;
  try {
    const records = parseCsv(csvLines.join('\n'), {
      delimiter: delimiterChar[delimiter],
      record_delimiter: '\n',
      relax_column_count: true,
      relax_quotes: true,
      skip_empty_lines: true,
      trim: true,
      bom: false,
      info: true,
      on_record: (record, context) => {
        lastRecordLine = context.lines;
        return record;
      },
    }) as unknown as { record: string[]; info: { lines: number } }[];
    return records.map(({ record, info }) => ({ row: firstRow + info.lines - 1, cells: record.map((c) => c.trim()) }));
  } catch (err) {
    if (!(err instanceof CsvError)) throw err;
    if (err.code === 'CSV_QUOTE_NOT_CLOSED') {
      // csv-parse stops at the end of the text; the open quote is on the first non-blank line after the last
      // whole record (csvLines[lastRecordLine] is the line after it).
      let i = lastRecordLine;
      while (csvLines[i] === '') i += 1;
      issues.add(
        'BAD_QUOTING',
        'A quoted cell is never closed: a double quote (") opens a cell that runs to the end of the file.',
        { row: firstRow + i },
      );
      return issues.fail();
    }
    // csv-parse counts lines from the start of the text it was given, not of the file: its message is not shown.
    const line = (err as CsvError & { lines?: number }).lines;
    issues.add(
      'BAD_QUOTING',
      err.code === 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE'
        ? 'A quoted cell goes on after its closing quote ("): only spaces, the separator or the end of the line may follow it.'
        : `The cells cannot be read (${err.code}).`,
      { row: line === undefined ? null : firstRow + line - 1 },
    );
    return issues.fail();
  }
}

/** A plain decimal number (optionally with exponent); null for anything else. */
export function parseDecimal(cell: string): number | null {
  if (!NUMBER_PATTERN.test(cell)) return null;
  const v = Number(cell);
  return Number.isFinite(v) ? v : null;
}

type HeaderResult =
  | { ok: true; delimiter: PlateDelimiter; cells: string[] }
  | { ok: false };

function detectDelimiter(headerText: string, row: number, format: PlateFormat, issues: IssueList): HeaderResult {
  const tabs = headerText.split('\t').length - 1;
  const commas = headerText.split(',').length - 1;
  const semicolons = headerText.split(';').length - 1;
  if (tabs > 0 && commas > 0) {
    issues.add(
      'WRONG_DELIMITER',
      `The header mixes tabs (${tabs}) and commas (${commas}); use one separator: comma or tab.`,
      { row },
    );
    return { ok: false };
  }
  const delimiter: PlateDelimiter | null = tabs > 0 ? 'tab' : commas > 0 ? 'comma' : null;
  if (delimiter === null) {
    if (semicolons > 0) {
      issues.add(
        'WRONG_DELIMITER',
        'The file is separated by semicolons; Cristae reads comma-separated (CSV) or tab-separated files with a decimal point. Export again with a comma or tab separator.',
        { row },
      );
    } else if (/\S\s+\S/.test(headerText.trim())) {
      issues.add(
        'WRONG_DELIMITER',
        'The header is separated by spaces; separate columns with a comma or a tab.',
        { row },
      );
    } else {
      issues.add(
        'NO_WELL_COLUMNS',
        `The header has a single column; expected ${PLATE_TIME_COLUMN} followed by well columns (A1 to ${lastWellOf(format)}), separated by commas or tabs.`,
        { row },
      );
    }
    return { ok: false };
  }
  return { ok: true, delimiter, cells: readCsvRecords([headerText], row, delimiter, issues)[0]!.cells };
}

function lastWellOf(format: PlateFormat): string {
  return `${plateRowsOf(format).at(-1)!}${plateDimensions[format].columns}`;
}

interface WellColumn {
  well: string;
  header: string;
  columnNumber: number;
}

function readHeaderCells(
  cells: string[],
  row: number,
  format: PlateFormat,
  issues: IssueList,
): { wells: WellColumn[]; timeColumnOk: boolean } {
  const first = cells[0] ?? '';
  const timeColumnOk = first.toLowerCase() === PLATE_TIME_COLUMN;
  if (!timeColumnOk) {
    let hint = '';
    if (/^time/i.test(first)) hint = ` Times must be in seconds, in a column named ${PLATE_TIME_COLUMN}.`;
    else if (normaliseWellIdFor(first, format) !== null) hint = ' The time column must come before the wells.';
    issues.add(
      'BAD_TIME_COLUMN',
      `The first column must be ${PLATE_TIME_COLUMN} (seconds), found "${first}".${hint}`,
      { row, column: first === '' ? null : first, columnNumber: 1 },
    );
  }
  const wells: WellColumn[] = [];
  const seen = new Map<string, WellColumn>();
  cells.forEach((header, i) => {
    if (i === 0) return;
    const columnNumber = i + 1;
    if (header === '') {
      issues.add(
        'EMPTY_COLUMN_NAME',
        `Column ${columnNumber} has no name (an extra separator at the end of the line, or two in a row?).`,
        { row, columnNumber },
      );
      return;
    }
    if (header.toLowerCase() === PLATE_TIME_COLUMN) {
      issues.add('BAD_TIME_COLUMN', `${PLATE_TIME_COLUMN} must be the first column only.`, {
        row,
        column: header,
        columnNumber,
      });
      return;
    }
    const well = normaliseWellIdFor(header, format);
    if (well === null) {
      issues.add(
        'BAD_WELL_NAME',
        `"${header}" is not a well of a ${format}-well plate; well columns are named ${describeWellRange(format)}.`,
        { row, column: header, columnNumber },
      );
      return;
    }
    const earlier = seen.get(well);
    if (earlier) {
      issues.add(
        'DUPLICATE_WELL',
        `Well ${well} appears twice: "${earlier.header}" (column ${earlier.columnNumber}) and "${header}" (column ${columnNumber}).`,
        { row, column: header, columnNumber },
      );
      return;
    }
    const col = { well, header, columnNumber };
    seen.set(well, col);
    wells.push(col);
  });
  if (cells.length === 1 || (cells.length > 1 && cells.slice(1).every((c) => c === ''))) {
    issues.add('NO_WELL_COLUMNS', 'The header has no well columns after the time column.', { row });
  }
  return { wells, timeColumnOk };
}

function notANumberMessage(cell: string, isTime: boolean): string {
  const shown = cell.length > 40 ? `${cell.slice(0, 40)}…` : cell;
  if (isTime && CLOCK_PATTERN.test(cell)) {
    return `Time "${shown}" is a clock time; write times as seconds (e.g. 90 for 1:30).`;
  }
  // In a comma file such a cell was quoted, as spreadsheets set to a decimal comma write it.
  if (DECIMAL_COMMA_PATTERN.test(cell)) {
    return `"${shown}" uses a decimal comma; write numbers with a decimal point (e.g. 0.512).`;
  }
  return isTime
    ? `Time "${shown}" is not a number of seconds.`
    : `"${shown}" is not a number; every reading must be a decimal number such as 0.512.`;
}

/**
 * Parses an uploaded kinetic plate file of a 24-, 96- (default) or 384-well plate. Takes the raw bytes
 * (preferred: the UTF-8 check needs them) or already-decoded text. Returns the readings of every well
 * column, or throws PlateImportError listing every problem found.
 */
export function parsePlateFile(input: Uint8Array | string, format: PlateFormat = 96): PlateParseResult {
  const text = decodePlateText(input);
  const lines = splitLines(text);
  // Annotated so that TypeScript treats issues.fail() (returns never) as ending the path.
  const issues: IssueList = new IssueList();

  // Comments and blank lines before the header. A Map keeps comment keys plain data.
  const metadata = new Map<string, { value: string; row: number }>();
  let headerIndex = -1;
  for (let i = 0; i < lines.length; i += 1) {
    const line = lines[i]!;
    const trimmed = line.trim();
    if (trimmed === '') continue;
    if (trimmed.startsWith('#')) {
      const m = METADATA_PATTERN.exec(trimmed);
      if (m) {
        const key = m[1]!.toLowerCase();
        const earlier = metadata.get(key);
        if (earlier) {
          issues.add(
            'BAD_METADATA',
            `The comment key "${key}" is given twice (first on line ${earlier.row}).`,
            { row: i + 1 },
          );
        } else {
          metadata.set(key, { value: m[2]!, row: i + 1 });
        }
      }
      continue;
    }
    headerIndex = i;
    break;
  }
  if (headerIndex === -1) {
    issues.add(
      'EMPTY_FILE',
      `The file has no header line: expected a line such as "${PLATE_TIME_COLUMN},A1,A2" after any # comment lines.`,
    );
    issues.fail();
  }

  let wavelengthNm: number | null = null;
  const wavelength = metadata.get('wavelength_nm');
  if (wavelength !== undefined) {
    const v = parseDecimal(wavelength.value);
    if (v === null || v <= 0) {
      issues.add(
        'BAD_METADATA',
        `wavelength_nm must be a positive number of nanometres, found "${wavelength.value}".`,
        { row: wavelength.row },
      );
    } else {
      wavelengthNm = v;
    }
  }

  const headerRow = headerIndex + 1;
  const header = detectDelimiter(lines[headerIndex]!, headerRow, format, issues);
  if (!header.ok) issues.fail();
  const { delimiter, cells: headerCells } = header;
  const { wells: wellColumns, timeColumnOk } = readHeaderCells(headerCells, headerRow, format, issues);
  const width = headerCells.length;

  const timesS: number[] = [];
  const readings: number[][] = wellColumns.map(() => []);
  let dataRows = 0;
  let previous: { t: number; row: number } | null = null;

  for (const { row, cells } of readCsvRecords(lines.slice(headerIndex + 1), headerRow + 1, delimiter, issues)) {
    const line = lines[row - 1]!;
    if (line.trimStart().startsWith('#')) {
      issues.add(
        'COMMENT_AFTER_HEADER',
        'Comment lines (#) belong above the header; below it every line is a reading.',
        { row },
      );
      continue;
    }
    dataRows += 1;
    if (cells.length !== width) {
      let hint = '';
      if (cells.length === 1 && line.includes(';')) hint = ' The line is separated by semicolons.';
      else if (delimiter === 'comma' && cells.length > width)
        hint = ' If the numbers use a decimal comma, it splits each into two cells: use a decimal point.';
      else if (delimiter === 'comma' && line.includes('\t')) hint = ' The line is separated by tabs.';
      else if (delimiter === 'tab' && cells.length === 1 && line.includes(','))
        hint = ' The line is separated by commas.';
      const missingHeader = cells.length < width ? headerCells[cells.length] : undefined;
      issues.add(
        'COLUMN_COUNT',
        `Expected ${width} ${delimiterName[delimiter]}-separated cells as in the header (line ${headerRow}), found ${cells.length}.${hint}`,
        cells.length < width
          ? { row, column: missingHeader || null, columnNumber: cells.length + 1 }
          : { row, columnNumber: width + 1 },
      );
      continue;
    }

    const timeCell = cells[0]!;
    const t = parseDecimal(timeCell);
    if (!timeColumnOk) {
      // The first column is not a time column (already reported): checking it as times would
      // only repeat that problem on every line.
    } else if (timeCell === '') {
      issues.add('EMPTY_CELL', 'The time is missing.', {
        row,
        column: headerCells[0] || null,
        columnNumber: 1,
      });
    } else if (t === null) {
      issues.add('NOT_A_NUMBER', notANumberMessage(timeCell, true), {
        row,
        column: headerCells[0] || null,
        columnNumber: 1,
      });
    } else {
      if (previous !== null && !(t > previous.t)) {
        issues.add(
          'TIME_NOT_INCREASING',
          `Time ${timeCell} s is not later than ${previous.t} s on line ${previous.row}; times must strictly increase.`,
          { row, column: headerCells[0] || null, columnNumber: 1 },
        );
      }
      previous = { t, row };
      timesS.push(t);
    }

    wellColumns.forEach((col, k) => {
      const cell = cells[col.columnNumber - 1]!;
      const a = parseDecimal(cell);
      if (cell === '') {
        issues.add('EMPTY_CELL', `No reading for well ${col.well}.`, {
          row,
          column: col.header,
          columnNumber: col.columnNumber,
        });
      } else if (a === null) {
        issues.add('NOT_A_NUMBER', notANumberMessage(cell, false), {
          row,
          column: col.header,
          columnNumber: col.columnNumber,
        });
      } else {
        readings[k]!.push(a);
      }
    });
  }

  if (dataRows === 0) {
    issues.add(
      'HEADER_ONLY',
      'The file has a header but no readings below it.',
      { row: headerRow },
    );
  } else if (dataRows < MIN_PLATE_READINGS) {
    issues.add(
      'TOO_FEW_READINGS',
      `The file has ${dataRows} reading; at least ${MIN_PLATE_READINGS} are needed to follow a rate.`,
      { row: headerRow },
    );
  }

  issues.throwIfAny();

  const wells: ParsedWell[] = wellColumns.map((col, k) => ({
    well: col.well,
    header: col.header,
    columnNumber: col.columnNumber,
    absorbances: readings[k]!,
  }));
  return {
    delimiter,
    headerLine: headerRow,
    metadata: Object.fromEntries([...metadata].map(([k, v]) => [k, v.value])),
    wavelengthNm,
    timesS,
    wells,
  };
}
