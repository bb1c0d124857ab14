import { formatCalendarDate, formatInstant, utcOffsetAt } from '@/schemas/date-format';
import { formatPercentOfMean, formatResultNumber, type Thresholds } from '@/schemas/result-format';

/**
 * Printing rules for numbers and dates on the report. Dates are written day, month name, year so
 * that no reader can swap day and month; date-times carry their UTC offset.
 */

/** '2025-03-14' -> '14 Mar 2025'. The calendar date as given, no time-zone shift (the screens' format too). */
export const formatDate = formatCalendarDate;

/** An ISO date-time printed in the laboratory's zone as the screens show it, plus its offset: '14 Mar 2025 10:30 (UTC+01:00)'. */
export function formatDateTime(iso: string, timeZone = 'UTC'): string {
  return `${formatInstant(iso, timeZone)} (${utcOffsetAt(iso, timeZone)})`;
}

/** A date-only string prints as a date; a date-time prints with its time. */
export function formatDateOrDateTime(value: string, timeZone?: string): string {
  return /^\d{4}-\d{2}-\d{2}$/.test(value) ? formatDate(value) : formatDateTime(value, timeZone);
}

/**
 * Fixed decimals when the assay definition sets them; otherwise three significant figures, never
 * fewer than zero decimals (1234 -> '1234', 56.78 -> '56.8', 0.01234 -> '0.0123'). The rule is shared
 * with the screen (src/schemas/result-format.ts); `thresholds` keeps the printed number on the side of
 * each reference limit that its status says.
 */
export function formatNumber(value: number, decimals?: number, thresholds?: Thresholds): string {
  return formatResultNumber(value, decimals, thresholds);
}

/** % of the reference mean, as on the screen: never printed across a criterion threshold in `thresholds`. */
export function formatPercent(value: number, thresholds?: Thresholds): string {
  return formatPercentOfMean(value, thresholds);
}
