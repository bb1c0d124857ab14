/** Significant-figure formatting for the bench screens; stored numbers are never rounded. */
export function fmt(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return Number(v.toPrecision(digits)).toString();
}

/** "Line 5, column B2 (column 5): message" for a located file or paste problem. */
export function located(row: number | null, column: string | null, message: string): string {
  const where = [row !== null ? `line ${row}` : null, column !== null ? `column ${column}` : null].filter(Boolean).join(', ');
  return where ? `${where.charAt(0).toUpperCase()}${where.slice(1)}: ${message}` : message;
}
