/**
 * The laboratory works in its own time zone (lab profile `timeZone`); the database stores UTC. Forms send
 * wall-clock date-times as the browser's datetime-local control gives them ("2026-03-04T09:30"), which are
 * read here as the laboratory's local time.
 */

const LOCAL_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,3})\d*)?)?$/;
const WITH_ZONE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?(?:Z|[+-]\d{2}:?\d{2})$/i;

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-CA', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** The wall-clock fields of an instant in a zone. */
export function wallClock(instant: Date, timeZone: string): { year: number; month: number; day: number; hour: number; minute: number; second: number } {
  const parts = Object.fromEntries(formatter(timeZone).formatToParts(instant).map((p) => [p.type, p.value]));
  return {
    year: Number(parts.year),
    month: Number(parts.month),
    day: Number(parts.day),
    hour: Number(parts.hour),
    minute: Number(parts.minute),
    second: Number(parts.second),
  };
}

/** Minutes the zone is ahead of UTC at that instant. */
function offsetMinutes(instantMs: number, timeZone: string): number {
  const w = wallClock(new Date(instantMs), timeZone);
  const asUtc = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
  return Math.round((asUtc - Math.floor(instantMs / 1000) * 1000) / 60_000);
}

/**
 * The UTC instant of a wall-clock time in a zone. A time repeated when clocks go back resolves to the earlier
 * instant; a time skipped when clocks go forward resolves as if the old offset still applied (so it reads
 * one gap later on the clock).
 */
export function zonedToUtc(
  f: { year: number; month: number; day: number; hour?: number; minute?: number; second?: number; ms?: number },
  timeZone: string,
): Date {
  const naive = Date.UTC(f.year, f.month - 1, f.day, f.hour ?? 0, f.minute ?? 0, f.second ?? 0, f.ms ?? 0);
  const DAY = 86_400_000;
  const before = offsetMinutes(naive - DAY, timeZone);
  const after = offsetMinutes(naive + DAY, timeZone);
  const valid = [before, after]
    .map((o) => naive - o * 60_000)
    .filter((t) => {
      const w = wallClock(new Date(t), timeZone);
      return w.year === f.year && w.month === f.month && w.day === f.day && w.hour === (f.hour ?? 0) && w.minute === (f.minute ?? 0);
    });
  return new Date(valid.length ? Math.min(...valid) : naive - before * 60_000);
}

/**
 * Reads a date-time from a form or API call: wall-clock strings are in the laboratory's zone, strings with Z
 * or an offset are taken as they are. Returns null for anything else.
 */
export function parseLabDateTime(value: string, timeZone: string): Date | null {
  const m = LOCAL_DATE_TIME.exec(value);
  if (m) {
    const [, y, mo, d, h, mi, s, ms] = m;
    const fields = {
      year: Number(y),
      month: Number(mo),
      day: Number(d),
      hour: Number(h),
      minute: Number(mi),
      second: Number(s ?? 0),
      ms: Number((ms ?? '0').padEnd(3, '0')),
    };
    if (fields.month < 1 || fields.month > 12 || fields.day < 1 || fields.day > 31 || fields.hour > 23 || fields.minute > 59 || fields.second > 59) {
      return null;
    }
    const check = new Date(Date.UTC(fields.year, fields.month - 1, fields.day));
    if (check.getUTCDate() !== fields.day) return null;
    return zonedToUtc(fields, timeZone);
  }
  if (WITH_ZONE.test(value)) {
    const t = Date.parse(value);
    return Number.isNaN(t) ? null : new Date(t);
  }
  return null;
}

/** The UTC instant at which a calendar date (YYYY-MM-DD) starts in the laboratory's zone. */
export function startOfLabDay(isoDate: string, timeZone: string): Date {
  const [y, m, d] = isoDate.split('-').map(Number) as [number, number, number];
  return zonedToUtc({ year: y, month: m, day: d }, timeZone);
}

/** The UTC instant at which the day after a calendar date starts in the laboratory's zone. */
export function endOfLabDay(isoDate: string, timeZone: string): Date {
  const [y, m, d] = isoDate.split('-').map(Number) as [number, number, number];
  const next = new Date(Date.UTC(y, m - 1, d + 1));
  return zonedToUtc({ year: next.getUTCFullYear(), month: next.getUTCMonth() + 1, day: next.getUTCDate() }, timeZone);
}

/** The calendar year of an instant in the laboratory's zone (accession numbers run per lab year). */
export function labYear(instant: Date, timeZone: string): number {
  return wallClock(instant, timeZone).year;
}
