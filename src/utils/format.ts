/** Dates, times and sizes as every screen shows them. */
/** "14 Mar 2026, 15:20": date and time in the reader's own zone, day first so no one swaps day and month. */
export function formatWhen(iso: string): string {
  const d = new Date(iso);
  return `${d.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric' })}, ${d.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' })}`;
}

export function formatDay(isoDate: string): string {
  const [y, m, d] = isoDate.split('-').map(Number) as [number, number, number];
  return new Date(Date.UTC(y, m - 1, d)).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
}

export function formatBytes(n: number): string {
  return n < 1024 ? `${n} B` : n < 1024 * 1024 ? `${Math.round(n / 102.4) / 10} kB` : `${Math.round(n / 104857.6) / 10} MB`;
}

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
