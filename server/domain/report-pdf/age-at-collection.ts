/*
 * A patient's age on the day a specimen was collected, as the report prints it. Calendar arithmetic on
 * dates only (YYYY-MM-DD, no time of day, no zone): the caller passes the collection day in the laboratory's
 * zone.
 *
 * Rule: a month (and so a year) of life is completed on the same day of the month as the birth; when that
 * day does not exist in the month (born on the 29th–31st), on the first day of the next month. So someone
 * born on 29 February turns one on 1 March of a common year, and a baby born on 31 January is one month old
 * on 1 March (28 days old on 28 February).
 *
 * Printed (paediatric practice): whole years from 2 years; years and months from 1 to 2 years; months from
 * 1 month to 1 year; days under 1 month.
 */

export type Age = { years: number; months: number; days: number };

const DAY_MS = 86_400_000;

function parseDay(iso: string): { y: number; m: number; d: number } | null {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  if (!match) return null;
  const [y, m, d] = [Number(match[1]), Number(match[2]) - 1, Number(match[3])];
  const t = new Date(Date.UTC(y, m, d));
  // Refuse dates that roll over (2023-02-30).
  return t.getUTCFullYear() === y && t.getUTCMonth() === m && t.getUTCDate() === d ? { y, m, d } : null;
}

const daysInMonth = (y: number, m: number) => new Date(Date.UTC(y, m + 1, 0)).getUTCDate();

/** The day `n` whole months after a birth day, by the rule above, as a UTC midnight in ms. */
function monthAnniversary(birth: { y: number; m: number; d: number }, n: number): number {
  const y = birth.y + Math.floor((birth.m + n) / 12);
  const m = (birth.m + n) % 12;
  return birth.d <= daysInMonth(y, m) ? Date.UTC(y, m, birth.d) : Date.UTC(y, m + 1, 1);
}

/** Completed years, then completed months, then days; null when a date is invalid or `on` precedes birth. */
export function ageOn(dateOfBirth: string, on: string): Age | null {
  const birth = parseDay(dateOfBirth);
  const day = parseDay(on);
  if (!birth || !day) return null;
  const t = Date.UTC(day.y, day.m, day.d);
  if (t < Date.UTC(birth.y, birth.m, birth.d)) return null;
  let months = (day.y - birth.y) * 12 + (day.m - birth.m);
  while (months > 0 && monthAnniversary(birth, months) > t) months -= 1;
  const days = Math.round((t - monthAnniversary(birth, months)) / DAY_MS);
  return { years: Math.floor(months / 12), months: months % 12, days };
}

const plural = (n: number, unit: string) => `${n} ${unit}${n === 1 ? '' : 's'}`;

/** '34 years', '1 year 3 months', '7 months', '12 days'. */
export function formatAge(age: Age): string {
  if (age.years >= 2) return plural(age.years, 'year');
  if (age.years === 1) return `${plural(1, 'year')} ${plural(age.months, 'month')}`;
  if (age.months >= 1) return plural(age.months, 'month');
  return plural(age.days, 'day');
}

/** The line the report prints; says why when the age cannot be given. */
export function ageAtCollectionText(dateOfBirth: string, collectionDay: string | null): string {
  if (collectionDay === null) return 'Not known (collection date not recorded)';
  const age = ageOn(dateOfBirth, collectionDay);
  return age ? formatAge(age) : 'Not known (collected before the recorded date of birth)';
}
