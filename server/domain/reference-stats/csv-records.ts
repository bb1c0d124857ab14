import type { ControlCsvIssue } from '@/schemas/reference-interval';

export interface CsvRecord {
  /** 1-based record number, the header being row 1; equals the line number unless a quoted cell spans lines. */
  row: number;
  cells: string[];
}

/**
 * Splits comma-separated text into records (RFC 4180 quoting: "a,b" and "" for a literal quote;
 * CRLF, LF or CR line ends). Returns an issue instead of records when a quote is never closed.
 */
export function splitCsvRecords(text: string): { records: CsvRecord[] } | { issue: ControlCsvIssue } {
  const records: CsvRecord[] = [];
  let cells: string[] = [];
  let cell = '';
  let inQuotes = false;
  let quoteRow = 0;
  let i = 0;
  const endRecord = (): void => {
    cells.push(cell);
    records.push({ row: records.length + 1, cells });
    cells = [];
    cell = '';
  };
  while (i < text.length) {
    const ch = text[i];
    if (inQuotes) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          cell += '"';
          i += 2;
          continue;
        }
        inQuotes = false;
      } else {
        cell += ch;
      }
      i++;
      continue;
    }
    if (ch === '"' && cell.trim() === '') {
      inQuotes = true;
      quoteRow = records.length + 1;
      cell = '';
    } else if (ch === ',') {
      cells.push(cell);
      cell = '';
    } else if (ch === '\r' || ch === '\n') {
      endRecord();
      if (ch === '\r' && text[i + 1] === '\n') i++;
    } else {
      cell += ch;
    }
    i++;
  }
  if (inQuotes) {
    return { issue: { row: quoteRow, column: null, message: 'A quoted cell is never closed' } };
  }
  if (cell !== '' || cells.length > 0) endRecord();
  return { records };
}

export function isBlankRecord(record: CsvRecord): boolean {
  return record.cells.every((c) => c.trim() === '');
}
