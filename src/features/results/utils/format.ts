export function fmt(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return Number(v.toPrecision(digits)).toString();
}

export const measureNames = { activity: 'activity', ratio_cs: 'ratio to CS', ratio_cii: 'ratio to CII' } as const;
