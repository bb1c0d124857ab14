import type { CaseHistoryChange } from '@/schemas/case';

const withUnit = (v: string, unit?: string) => (unit ? `${v} ${unit}` : v);

/**
 * One change as a technologist would say it: "Protein changed from 4.1 to 4.25 mg/mL" (the unit once, at the
 * end, when both values share it), "Source set to Quadriceps", "Wet weight removed (was 41 mg)".
 */
export function changeSentence(c: CaseHistoryChange): string {
  if (c.before === null && c.after === null) return `${c.field} left empty`;
  if (c.before === null) return `${c.field} set to ${withUnit(c.after!, c.unit)}`;
  if (c.after === null) return `${c.field} removed (was ${withUnit(c.before, c.unit)})`;
  return `${c.field} changed from ${c.before} to ${withUnit(c.after, c.unit)}`;
}
