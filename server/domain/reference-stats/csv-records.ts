import { CsvError, parse } from 'csv-parse/sync';
import type { ControlCsvIssue } from '@/schemas/reference-interval';

export interface CsvRecord {
  /** 1-based record number, the header being row 1; equals the line number unless a quoted cell spans lines. */
  row: number;
  cells: string[];
}

/**
 * Splits comma-separated text into records with csv-parse (RFC 4180 quoting: "a,b" and "" for a literal quote;
 * CRLF, LF or CR line ends, mixed in one file too). Rows may differ in length (the caller says which row is off);
 * blank lines are kept as records so row numbers stay those of the file; a quote inside an unquoted cell is kept
 * as a character. Returns an issue instead of records when a quote is never closed.
 */
export function splitCsvRecords(text: string): { records: CsvRecord[] } | { issue: ControlCsvIssue } {
  try {
    const parsed = parse(text, {
      relax_column_count: true,
      relax_quotes: true,
      skip_empty_lines: false,
      ltrim: true,
      record_delimiter: ['\r\n', '\n', '\r'],
      info: true,
    }) as unknown as { record: string[]; info: { records: number } }[];
    return { records: parsed.map(({ record, info }) => ({ row: info.records, cells: record })) };
  } catch (err) {
    if (err instanceof CsvError && err.code === 'CSV_QUOTE_NOT_CLOSED') {
      // The quote opened in the record after the last complete one.
      const complete = Number((err as CsvError & { records?: number }).records ?? 0);
      return { issue: { row: complete + 1, column: null, message: 'A quoted cell is never closed' } };
    }
    if (err instanceof CsvError) return { issue: { row: null, column: null, message: `The file cannot be read as CSV: ${err.message}` } };
    throw err;
  }
}

export function isBlankRecord(record: CsvRecord): boolean {
  return record.cells.every((c) => c.trim() === '');
}
