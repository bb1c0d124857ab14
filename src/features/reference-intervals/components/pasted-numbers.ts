/**
 * Reads numbers pasted from a spreadsheet column or typed in a row: separated by line breaks, tabs,
 * spaces, commas or semicolons; a point is the decimal separator. Names the first few items that are not
 * numbers, by position, so the user can find them.
 */
export function readPastedNumbers(text: string): { values: number[]; problem: string | null } {
  const tokens = text.split(/[\s,;]+/).filter((t) => t !== '');
  const values: number[] = [];
  const bad: string[] = [];
  tokens.forEach((t, index) => {
    const v = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
    if (Number.isFinite(v)) values.push(v);
    else bad.push(`item ${index + 1} ("${t.slice(0, 20)}")`);
  });
  if (bad.length > 0) {
    const more = bad.length > 3 ? ` and ${bad.length - 3} more` : '';
    return { values, problem: `Not a number: ${bad.slice(0, 3).join(', ')}${more}` };
  }
  return { values, problem: null };
}
