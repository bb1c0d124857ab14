/*
 * Times are stored in UTC and shown in the laboratory's time zone (lab profile), whatever zone the browser is
 * in. Forms send wall-clock values ("2026-03-04T09:30"); the server reads them in the laboratory's zone.
 */

import { formatDateIn, formatInstant } from '@/schemas/date-format';

const cache = new Map<string, Intl.DateTimeFormat>();
function fmt(key: string, make: () => Intl.DateTimeFormat): Intl.DateTimeFormat {
  let f = cache.get(key);
  if (!f) {
    f = make();
    cache.set(key, f);
  }
  return f;
}

/** "30 Nov 2026 11:25" in the laboratory's zone (the format of every screen and the PDF). */
export function formatLabDateTime(iso: string | null | undefined, timeZone: string): string {
  return iso ? formatInstant(iso, timeZone) : '—';
}

/** "30 Nov 2026" in the laboratory's zone. */
export function formatLabDate(iso: string | null | undefined, timeZone: string): string {
  return iso ? formatDateIn(iso, timeZone) : '—';
}

/** The value a datetime-local control shows for an instant, in the laboratory's zone ("2026-11-30T11:25"). */
export function toLabInputValue(iso: string | Date | null | undefined, timeZone: string): string {
  if (!iso) return '';
  const f = fmt(`in|${timeZone}`, () =>
    new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }),
  );
  const p = Object.fromEntries(f.formatToParts(new Date(iso)).map((x) => [x.type, x.value]));
  return `${p.year}-${p.month}-${p.day}T${p.hour}:${p.minute}`;
}

/** Today's date in the laboratory's zone ("2026-11-30"). */
export function labToday(timeZone: string): string {
  return toLabInputValue(new Date(), timeZone).slice(0, 10);
}

/** The zone's short name now ("GMT", "NZDT"), to label time fields. */
export function zoneAbbreviation(timeZone: string): string {
  const f = fmt(`z|${timeZone}`, () => new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'short' }));
  return f.formatToParts(new Date()).find((p) => p.type === 'timeZoneName')?.value ?? timeZone;
}
