import { z } from 'zod';

/** Respiratory-chain assays and citrate synthase, by their trade abbreviations. */
export const assayCodes = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS'] as const;
export const assayCodeSchema = z.enum(assayCodes);
export type AssayCode = z.infer<typeof assayCodeSchema>;

/** The quantity a reference interval and a comparison are about. */
export const measures = ['activity', 'ratio_cs', 'ratio_cii'] as const;
export const measureSchema = z.enum(measures);
export type Measure = z.infer<typeof measureSchema>;

export const specimenTypes = [
  'skeletal_muscle',
  'liver',
  'heart_muscle',
  'fibroblasts',
  'lymphoblasts',
  'other',
] as const;
export const specimenTypeSchema = z.enum(specimenTypes);
export type SpecimenType = z.infer<typeof specimenTypeSchema>;

export const specimenTypeLabels: Record<SpecimenType, string> = {
  skeletal_muscle: 'Skeletal muscle',
  liver: 'Liver',
  heart_muscle: 'Heart muscle',
  fibroblasts: 'Cultured skin fibroblasts',
  lymphoblasts: 'Lymphoblasts',
  other: 'Other',
};

/** Cultured cells are judged against the cell-line thresholds of the diagnostic criteria. */
export function specimenClassOf(type: SpecimenType): 'tissue' | 'cell_line' {
  return type === 'fibroblasts' || type === 'lymphoblasts' ? 'cell_line' : 'tissue';
}

export const roles = ['technologist', 'director', 'clinician', 'admin'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

export const idParamsSchema = z.object({ id: z.coerce.number().int().positive() });

/* ---------------------------------------------------------------- dates */

const CALENDAR_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const DATE_TIME = /^(\d{4}-\d{2}-\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?(?:Z|[+-]\d{2}:?\d{2})?$/i;
const DAY_MS = 86_400_000;

/**
 * Earliest date Cristae accepts anywhere (births, collection, receipt, interval validity): nobody alive was
 * born before 1900 and no specimen or interval in use is older. A plausibility limit we chose; it catches
 * 0000-01-01 and two-digit years typed as 0019.
 */
export const EARLIEST_DATE = '1900-01-01';
export const EARLIEST_BIRTH_DATE = EARLIEST_DATE;

/** True when YYYY-MM-DD names a real day of the Gregorian calendar (2020-02-29 yes, 2019-02-29 and 2019-13-01 no). */
export function isCalendarDate(text: string): boolean {
  const m = CALENDAR_DATE.exec(text);
  if (!m) return false;
  const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (month < 1 || month > 12 || day < 1) return false;
  // Day 0 of the next month is the last day of this one; the leap-year cycle repeats every 400 years.
  const daysInMonth = new Date(Date.UTC(2000 + (year % 400), month, 0)).getUTCDate();
  return day <= daysInMonth;
}

/**
 * The latest calendar date that can be "today" somewhere: tomorrow in UTC, because a laboratory east of
 * Greenwich (up to UTC+14) is already on the next day while UTC is not.
 */
export function latestToday(now: Date = new Date()): string {
  return new Date(now.getTime() + DAY_MS).toISOString().slice(0, 10);
}

export interface CalendarDateRules {
  /** Names the field in messages, e.g. "Date of birth". */
  label: string;
  /** Earliest allowed date, YYYY-MM-DD. */
  notBefore?: string;
  /** Refuse dates after today (see latestToday). */
  notInFuture?: boolean;
}

/** A calendar date as YYYY-MM-DD: a real day, optionally not before a date and not in the future. */
export function calendarDateSchema({ label, notBefore, notInFuture = false }: CalendarDateRules) {
  return z.string().superRefine((text, ctx) => {
    if (!CALENDAR_DATE.test(text)) {
      ctx.addIssue({ code: 'custom', message: `${label}: use the date format YYYY-MM-DD, e.g. 2019-05-14` });
    } else if (!isCalendarDate(text)) {
      ctx.addIssue({ code: 'custom', message: `${label}: ${text} is not a day on the calendar` });
    } else if (notBefore !== undefined && text < notBefore) {
      ctx.addIssue({ code: 'custom', message: `${label} cannot be before ${notBefore}` });
    } else if (notInFuture && text > latestToday()) {
      ctx.addIssue({ code: 'custom', message: `${label} cannot be in the future` });
    }
  });
}

/** A date of birth: a real day, from 1900-01-01 to today. */
export const birthDateSchema = calendarDateSchema({ label: 'Date of birth', notBefore: EARLIEST_BIRTH_DATE, notInFuture: true });

/**
 * A date-time as the browser's datetime-local control gives it ("2026-03-04T09:30"), or a full ISO string
 * with Z or an offset: the date must be a real day from 1900 on and the time a real time of day. Whether it
 * lies in the future depends on the laboratory's zone, so the server checks that.
 */
export function dateTimeSchema(label: string) {
  return z
    .string()
    .min(1, `${label} is required`)
    .superRefine((text, ctx) => {
      const m = DATE_TIME.exec(text);
      const [hour, minute, second] = m ? [Number(m[2]), Number(m[3]), Number(m[4] ?? 0)] : [0, 0, 0];
      if (!m || !isCalendarDate(m[1]!) || hour > 23 || minute > 59 || second > 59) {
        ctx.addIssue({ code: 'custom', message: `${label}: use a real date and time, e.g. 2026-03-04T09:30` });
      } else if (m[1]! < EARLIEST_DATE) {
        ctx.addIssue({ code: 'custom', message: `${label} cannot be before ${EARLIEST_DATE}` });
      }
    });
}

/* ---------------------------------------------------------------- text */

/**
 * Characters no typed text needs and that can hide or reorder what a reader sees: C0 controls, DEL, C1
 * controls, the bidirectional embeddings, overrides and isolates (U+202A–U+202E, U+2066–U+2069), and the
 * line and paragraph separators. Single-line fields (names, labels) also refuse the invisible direction
 * marks (U+200E, U+200F, U+061C) and every line break and tab; free text keeps tab, line feed and carriage return.
 */
// Matching control characters is the point of these two patterns.
// eslint-disable-next-line no-control-regex
const UNSAFE_IN_FREE_TEXT = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F\u2028\u2029\u202A-\u202E\u2066-\u2069]/u;
// eslint-disable-next-line no-control-regex
const UNSAFE_IN_LINE = /[\u0000-\u001F\u007F-\u009F\u061C\u200E\u200F\u2028\u2029\u202A-\u202E\u2066-\u2069]/u;

/** The first character a field must not contain, as "U+202E at position 4", or null when the text is clean. */
export function findUnsafeCharacter(text: string, multiline = false): string | null {
  const m = (multiline ? UNSAFE_IN_FREE_TEXT : UNSAFE_IN_LINE).exec(text);
  if (!m) return null;
  const code = m[0].codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0');
  return `U+${code} at position ${m.index + 1}`;
}

/**
 * A zod check for typed text: refuses control and text-direction characters (see above) with a message
 * naming the field and the character. Use `.superRefine(plainText('Family name'))`; pass `multiline` for
 * free text such as an interpretation.
 */
export function plainText(label: string, multiline = false) {
  return (text: string, ctx: z.RefinementCtx): void => {
    const found = findUnsafeCharacter(text, multiline);
    if (found) {
      ctx.addIssue({
        code: 'custom',
        message: `${label} cannot contain control or text-direction characters (found ${found})`,
      });
    }
  };
}

/* ---------------------------------------------------------------- time zones */

/**
 * True for a time-zone name the runtime's IANA database knows, aliases such as "UTC" and "Etc/GMT+5"
 * included. Bare offsets ("+01:00") are refused: they do not follow daylight saving.
 */
export function isIanaTimeZone(zone: string): boolean {
  if (zone.trim() === '' || /^[+\-\d]/.test(zone)) return false;
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

export const ianaTimeZoneSchema = z
  .string()
  .trim()
  .min(1, 'Enter the time zone, e.g. Europe/London')
  .max(60, 'At most 60 characters')
  .refine(isIanaTimeZone, 'Not a known IANA time zone; use a name such as Europe/London or UTC');
