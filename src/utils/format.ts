import { formatCalendarDate, formatInstant } from '@/schemas/date-format';

/** Dates, times and sizes as every screen shows them (dates as the PDF prints them: src/schemas/date-format.ts). */

let displayZone = Intl.DateTimeFormat().resolvedOptions().timeZone;
/** The laboratory's zone, from its profile: the shell sets it once signed in, so every time reads as at the bench. */
export function setDisplayTimeZone(timeZone: string): void {
  displayZone = timeZone;
}

/** "14 Mar 2026 15:20" in the laboratory's time zone, day first so no one swaps day and month. */
export function formatWhen(iso: string): string {
  return formatInstant(iso, displayZone);
}

/** "14 Mar 2026": a calendar date (date of birth, report date), no zone shift. */
export function formatDay(isoDate: string): string {
  return formatCalendarDate(isoDate);
}

export function formatBytes(n: number): string {
  return n < 1024 ? `${n} B` : n < 1024 * 1024 ? `${Math.round(n / 102.4) / 10} kB` : `${Math.round(n / 104857.6) / 10} MB`;
}

/** Significant-figure formatting for the bench screens; stored numbers are never rounded. */
export function fmt(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return Number(v.toPrecision(digits)).toString();
}

/** "Line 5, column B2 (column 5): message" for a located file or paste problem. */
export function located(row: number | null, column: string | null, message: string): string {
  const where = [row !== null ? `line ${row}` : null, column !== null ? `column ${column}` : null].filter(Boolean).join(', ');
  return where ? `${where.charAt(0).toUpperCase()}${where.slice(1)}: ${message}` : message;
}
