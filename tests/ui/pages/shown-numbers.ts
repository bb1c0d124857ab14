import { expect } from 'vitest';

/*
 * Reading numbers back off the screen, to compare them with the API's unrounded values without running the
 * client's own formatting code: a printed figure with d decimals stands for the value when it is within half a
 * unit of its last place [common practice: rounding to the printed precision], and a result carries at least three
 * significant figures [common practice for enzyme activities and ratios].
 */

const MINUS = '\u2212';

/** Every number in a piece of text, as printed (a true minus sign accepted), in order. */
export function numbersIn(text: string): string[] {
  return [...text.replaceAll(MINUS, '-').matchAll(/-?\d+(?:\.\d+)?/g)].map((m) => m[0]);
}

function decimalsOf(printed: string): number {
  const dot = printed.indexOf('.');
  return dot < 0 ? 0 : printed.length - dot - 1;
}

function significantFigures(printed: string): number {
  const digits = printed.replace('-', '').replace('.', '').replace(/^0+/, '');
  return digits.length;
}

/** `printed` is `value` rounded to the places it shows (and shows at least `minFigures` significant figures). */
export function expectPrintedAs(printed: string, value: number, minFigures = 3): void {
  const shown = Number(printed);
  const halfUnit = 0.5 * 10 ** -decimalsOf(printed);
  expect(Math.abs(shown - value), `${printed} printed for ${value}`).toBeLessThanOrEqual(halfUnit + 1e-9);
  if (minFigures > 0 && value !== 0) expect(significantFigures(printed), `${printed} for ${value}`).toBeGreaterThanOrEqual(minFigures);
}
