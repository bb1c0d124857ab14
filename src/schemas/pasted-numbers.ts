/*
 * Numbers pasted from a spreadsheet column or typed in a row, read the same way by the form and the server.
 *
 * Convention (stated to the user beside the field): values are separated by line breaks, tabs, spaces,
 * semicolons or commas, and a point is the decimal separator. A comma written directly between digits in an
 * item with no point ("37,5", "1,250") could be a decimal comma, a thousands separator or two values; it is
 * never guessed at: the item is refused, naming its line, and nothing is computed.
 */

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const INTEGER = /^[+-]?\d+$/;
const MAX_LISTED = 3;

export interface PastedNumbers {
  values: number[];
  /** Null when every item is a number; otherwise the first few problems, each naming its line. */
  problem: string | null;
}

/** Why one whitespace- or semicolon-separated item is refused, or null when it reads as numbers. */
function readItem(item: string, values: number[]): string | null {
  const parts = item.split(',');
  if (parts.length > 1 && /\d,\d/.test(item) && parts.every((p) => INTEGER.test(p))) {
    return parts.length === 2
      ? `"${item}" looks like a decimal comma; use a point (${parts.join('.')})`
      : `"${item}" has commas between digits (thousands separators or decimal commas?); ` +
          'separate values with new lines or spaces and use a point for decimals';
  }
  const read: number[] = [];
  for (const part of parts) {
    if (part === '') continue;
    const v = NUMBER.test(part) ? Number(part) : Number.NaN;
    if (!Number.isFinite(v)) return `"${part.slice(0, 20)}" is not a number`;
    read.push(v);
  }
  values.push(...read);
  return null;
}

export function readPastedNumbers(text: string): PastedNumbers {
  const values: number[] = [];
  const problems: string[] = [];
  text.split(/\r\n|\r|\n/).forEach((line, index) => {
    for (const item of line.split(/[\s;]+/)) {
      if (item === '') continue;
      const problem = readItem(item, values);
      if (problem) problems.push(`line ${index + 1}: ${problem}`);
    }
  });
  if (problems.length === 0) return { values, problem: null };
  const more = problems.length > MAX_LISTED ? `; and ${problems.length - MAX_LISTED} more` : '';
  const listed = problems.slice(0, MAX_LISTED).join('; ');
  return { values, problem: `${listed.charAt(0).toUpperCase()}${listed.slice(1)}${more}` };
}
