import { formatPercentOfMean, formatResultNumber, type Thresholds } from '@/schemas/result-format';

/**
 * Printing rules for numbers and dates on the report. Dates are written day, month name, year so
 * that no reader can swap day and month; date-times carry their UTC offset.
 */

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

function monthName(month: number): string {
  const name = MONTHS[month - 1];
  if (!name) throw new Error(`Month out of range: ${month}`);
  return name;
}

/** '2025-03-14' -> '14 Mar 2025'. The calendar date as given, no time-zone shift. */
export function formatDate(isoDate: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(isoDate);
  if (!m) throw new Error(`Not an ISO date: ${isoDate}`);
  return `${Number(m[3])} ${monthName(Number(m[2]))} ${m[1]}`;
}

/** An ISO date-time printed in the laboratory's zone: '14 Mar 2025 10:30 (UTC+01:00)'. */
export function formatDateTime(iso: string, timeZone = 'UTC'): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) throw new Error(`Not an ISO date-time: ${iso}`);
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    year: 'numeric',
    month: 'numeric',
    day: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'longOffset',
  }).formatToParts(date);
  const part = (type: Intl.DateTimeFormatPartTypes): string => parts.find((p) => p.type === type)?.value ?? '';
  const offset = part('timeZoneName').replace(/^GMT$/, 'UTC+00:00').replace(/^GMT/, 'UTC');
  const day = `${Number(part('day'))} ${monthName(Number(part('month')))} ${part('year')}`;
  return `${day} ${part('hour')}:${part('minute')} (${offset})`;
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
