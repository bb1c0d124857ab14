import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  bandThresholds,
  formatPercentOfMean,
  formatResultNumber,
  intervalThresholds,
} from '@/schemas/result-format';

/*
 * Printing results so that the printed number never contradicts its band or its interval position.
 * Thresholds: the enzyme criteria of Bernier FP et al., Neurology 2002;59:1406–1411 [from memory]
 * (tissue: major < 20%, minor 20–30% of the control mean; cell line: < 30%, 30–40%), docs/domain.md.
 * Rounding is checked against Intl.NumberFormat (the JavaScript engine's ICU number formatter, an
 * independent implementation) and by reading the printed text back as a number.
 */

const tissue = bandThresholds('skeletal_muscle');
const band = (pct: number) => (pct < 20 ? 'major' : pct < 30 ? 'minor' : 'not_met');
const readBack = (text: string) => Number(text.replace('%', '').replace('\u2212', '-'));
const intl = (v: number, places: number) =>
  new Intl.NumberFormat('en-US', { minimumFractionDigits: places, maximumFractionDigits: places, useGrouping: false }).format(v);

describe('formatPercentOfMean', () => {
  it('when CI/CS is at 20.2% (minor) and CI/CII at 19.9% (major), then they print distinctly, each on its band’s side of 20%', () => {
    // The numbers; bands after Bernier 2002 [from memory].
    const minor = formatPercentOfMean(20.2, tissue);
    const major = formatPercentOfMean(19.9, tissue);
    expect(minor).not.toBe(major);
    expect(band(readBack(minor))).toBe(band(20.2));
    expect(band(readBack(major))).toBe(band(19.9));
    expect(major).toBe('19.9%');
    expect(minor).toBe(`${intl(20.2, 0)}%`);
  });

  it.each([
    [19.96, '19.96%'],
    [19.996, '19.996%'],
    [29.97, '29.97%'],
    [19.4, '19%'],
    [20.04, '20%'],
    [30.4, '30%'],
  ])('when %s% lies near a tissue threshold, then it prints as %s', (pct, expected) => {
    // Whole per cent from 10% up [common practice]; one more decimal only where rounding would cross 20% or 30%.
    expect(formatPercentOfMean(pct, tissue)).toBe(expected);
    expect(band(readBack(expected))).toBe(band(pct));
  });

  it('when a value is a hair under a threshold, then the last printed digit is rounded towards its own side', () => {
    expect(formatPercentOfMean(19.99999999, tissue)).toBe('19.999999%');
  });

  it('when the specimen is a cell line, then the cell-line thresholds (30%, 40%) are the ones kept', () => {
    const cells = bandThresholds('fibroblasts');
    expect(formatPercentOfMean(29.96, cells)).toBe('29.96%');
    expect(formatPercentOfMean(19.96, cells)).toBe('20%');
    expect(formatPercentOfMean(39.97, cells)).toBe('39.97%');
  });

  it('when below 10%, then one decimal is printed', () => {
    expect(formatPercentOfMean(8.53, tissue)).toBe(`${intl(8.53, 1)}%`);
  });

  it('for any % of mean, the printed number is on the same side of every threshold and a true rounding', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 400, noNaN: true }), (pct) => {
        const text = formatPercentOfMean(pct, tissue);
        const printed = readBack(text);
        const places = (text.replace('%', '').split('.')[1] ?? '').length;
        // Same band as the unrounded value.
        expect(band(printed)).toBe(band(pct));
        // Within half a unit of the last printed place (with a little room for binary representation).
        expect(Math.abs(printed - pct)).toBeLessThanOrEqual(0.5 * 10 ** -places + 1e-9);
        // Never more decimals than needed: at most 6, and the default unless a threshold is near.
        const usual = Math.abs(pct) >= 10 ? 0 : 1;
        if (places > usual) expect(Math.min(Math.abs(pct - 20), Math.abs(pct - 30))).toBeLessThan(0.5 * 10 ** -(places - 1) + 1e-9);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('formatResultNumber', () => {
  it('when a value is just under the lower reference limit, then it is not printed as the limit', () => {
    // Interval bounds are inclusive [common practice], so 0.14996 against 0.15 is below and must not read "0.150".
    const t = intervalThresholds({ lower: 0.15, upper: 0.35 });
    expect(formatResultNumber(0.14996, undefined, t)).toBe('0.14996');
    expect(formatResultNumber(0.35004, undefined, t)).toBe('0.35004');
    expect(formatResultNumber(0.35, undefined, t)).toBe('0.350');
    expect(formatResultNumber(0.2523, undefined, t)).toBe(intl(0.2523, 3));
  });

  it('when no threshold is near, then three significant figures as the report always printed them', () => {
    expect(formatResultNumber(1234)).toBe('1234');
    expect(formatResultNumber(56.78)).toBe('56.8');
    expect(formatResultNumber(0.01234)).toBe('0.0123');
    expect(formatResultNumber(9.996)).toBe('10.0');
    expect(formatResultNumber(-1.5, 2)).toBe('\u22121.50');
  });
});
