/** Pairs of numbers pasted one pair per line (tab, comma, semicolon or spaces between); a header line is skipped. */
export function parseNumberPairs(text: string): { pairs: [number, number][]; problems: string[] } {
  const pairs: [number, number][] = [];
  const problems: string[] = [];
  const numeric = (c: string) => /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(c);
  let seen = false;
  text.split(/\r\n|\r|\n/).forEach((raw, i) => {
    const cells = raw.trim().split(/\t|,|;|\s+/).filter(Boolean);
    if (cells.length === 0) return;
    if (!seen && !cells.some(numeric)) return;
    seen = true;
    if (cells.length !== 2 || !numeric(cells[0]!) || !numeric(cells[1]!)) {
      problems.push(`Line ${i + 1}: expected two numbers, found "${raw.trim()}"`);
      return;
    }
    pairs.push([Number(cells[0]), Number(cells[1])]);
  });
  return { pairs, problems };
}

/** Numbers separated by commas, semicolons or spaces; the words that are not numbers are named. */
export function parseNumberList(text: string): { values: number[]; problems: string[] } {
  const values: number[] = [];
  const problems: string[] = [];
  for (const cell of text.split(/[\s,;]+/).filter(Boolean)) {
    const n = Number(cell);
    if (Number.isFinite(n)) values.push(n);
    else problems.push(`"${cell}" is not a number`);
  }
  return { values, problems };
}
