import type { TracePoint } from '@/schemas/assay';

export type PasteResult = { points: TracePoint[]; error: null } | { points: null; error: string };

/**
 * Reads readings pasted from a spreadsheet or an instrument's screen: one reading per line, time in seconds
 * then absorbance, separated by a tab, a comma, a semicolon or spaces. A header line is allowed; any other
 * line that is not two numbers is reported by its line number.
 */
export function parsePastedTrace(text: string, what = 'trace'): PasteResult {
  const points: TracePoint[] = [];
  const lines = text.split(/\r\n|\r|\n/);
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i]!.trim();
    if (!line) continue;
    const cells = line.split(/[\t,;]|\s+/).filter((c) => c.length > 0);
    const numbers = cells.map((c) => (/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(c) ? Number(c) : NaN));
    if (points.length === 0 && numbers.every((n) => Number.isNaN(n))) continue; // a header line
    if (cells.length !== 2) {
      return { points: null, error: `${what}, line ${i + 1}: expected two values (time in s, absorbance), found ${cells.length}` };
    }
    const bad = numbers.findIndex((n) => !Number.isFinite(n));
    if (bad >= 0) {
      return { points: null, error: `${what}, line ${i + 1}, ${bad === 0 ? 'time' : 'absorbance'}: "${cells[bad]}" is not a number` };
    }
    points.push({ t: numbers[0]!, a: numbers[1]! });
  }
  if (points.length === 0) return { points: null, error: `${what}: no readings pasted` };
  return { points, error: null };
}

export function formatTrace(points: readonly TracePoint[]): string {
  return points.map((p) => `${p.t}\t${p.a}`).join('\n');
}
