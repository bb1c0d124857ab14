import type { CreatePatientInput, Patient } from '@/schemas/case';

export const sexLabels: Record<Patient['sex'], string> = {
  female: 'Female',
  male: 'Male',
  other: 'Other',
  unknown: 'Not known',
};

/** Age on a given day, as a clinician says it: months under two years, then whole years. */
export function ageOn(dateOfBirth: string, on: Date = new Date()): string {
  const [y, m, d] = dateOfBirth.split('-').map(Number) as [number, number, number];
  let months = (on.getFullYear() - y) * 12 + (on.getMonth() + 1 - m);
  if (on.getDate() < d) months -= 1;
  if (months < 0) return '—';
  if (months < 24) return `${months} mo`;
  return `${Math.floor(months / 12)} y`;
}

/**
 * A new patient's form starts from what was typed in the search box: a lab ID (has digits, no spaces), a date
 * of birth, or a name ("Family, Given" or "Family Given").
 */
export function guessFromQuery(q: string): Partial<CreatePatientInput> {
  const s = q.trim();
  if (!s) return {};
  if (/^\d{4}-\d{2}-\d{2}$/.test(s)) return { dateOfBirth: s };
  if (/\d/.test(s) && !/\s/.test(s)) return { labPatientId: s.toUpperCase() };
  const cap = (w: string) => w.charAt(0).toUpperCase() + w.slice(1);
  if (s.includes(',')) {
    const [family, given] = s.split(',', 2).map((x) => x.trim());
    return { familyName: cap(family ?? ''), givenName: cap(given ?? '') };
  }
  const [family, ...given] = s.split(/\s+/);
  return { familyName: cap(family ?? ''), givenName: given.map(cap).join(' ') };
}
