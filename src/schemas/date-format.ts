/*
 * The one way Cristae writes dates, on every screen and in the PDF: day, month name, year ("14 Mar 2025"),
 * so no reader swaps day and month, and a time as 24-hour hours and minutes in the laboratory's time zone
 * ("14 Mar 2025 10:30"). Pure functions on Intl, shared by the client and the server.
 */

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** '2025-03-14' (or the date part of an ISO date-time) -> '14 Mar 2025': the calendar date as given, no zone shift. */
export function formatCalendarDate(isoDate: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(isoDate);
  const month = m ? MONTHS[Number(m[2]) - 1] : undefined;
  if (!m || !month) throw new Error(`Not an ISO date: ${isoDate}`);
  return `${Number(m[3])} ${month} ${m[1]}`;
}

const formatters = new Map<string, Intl.DateTimeFormat>();
function partsIn(date: Date, timeZone: string, withOffset: boolean): Record<string, string> {
  const key = `${timeZone}|${withOffset}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
      ...(withOffset ? { timeZoneName: 'longOffset' as const } : {}),
    });
    formatters.set(key, f);
  }
  return Object.fromEntries(f.formatToParts(date).map((p) => [p.type, p.value]));
}

function toDate(iso: string | Date): Date {
  const date = iso instanceof Date ? iso : new Date(iso);
  if (Number.isNaN(date.getTime())) throw new Error(`Not an ISO date-time: ${String(iso)}`);
  return date;
}

/** An instant as a date in the laboratory's zone: '14 Mar 2025'. */
export function formatDateIn(iso: string | Date, timeZone: string): string {
  const p = partsIn(toDate(iso), timeZone, false);
  return `${Number(p.day)} ${MONTHS[Number(p.month) - 1]} ${p.year}`;
}

/** An instant in the laboratory's zone: '14 Mar 2025 10:30'. */
export function formatInstant(iso: string | Date, timeZone: string): string {
  const p = partsIn(toDate(iso), timeZone, false);
  return `${formatDateIn(iso, timeZone)} ${p.hour}:${p.minute}`;
}

/** The zone's offset at that instant, 'UTC+01:00' (for a document read far from the laboratory). */
export function utcOffsetAt(iso: string | Date, timeZone: string): string {
  const name = partsIn(toDate(iso), timeZone, true).timeZoneName ?? 'GMT';
  return name.replace(/^GMT$/, 'UTC+00:00').replace(/^GMT/, 'UTC');
}
