import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import fc from 'fast-check';
import PDFDocument from 'pdfkit';
import { describe, expect, it } from 'vitest';
import { fontChains, readCoverage, woffToSfnt } from '../../../../server/domain/report-pdf/fonts';
import {
  registerFonts,
  shapeRuns,
  textWidth,
  uncoveredCharacters,
  wrapText,
  type TextStyle,
} from '../../../../server/domain/report-pdf/text';

/**
 * Font handling is checked against fontkit, the font parser pdfkit itself uses (reached through
 * pdfkit's own dependency, not imported by the app) [common practice: an independent reference
 * implementation of the OpenType/WOFF formats].
 */

interface FontkitFont {
  numGlyphs: number;
  characterSet: number[];
  hasGlyphForCodePoint(cp: number): boolean;
  glyphForCodePoint(cp: number): { id: number; advanceWidth: number; path: { toSVG(): string } };
}
const requireFromPdfkit = createRequire(createRequire(import.meta.url).resolve('pdfkit'));
const fontkit = requireFromPdfkit('fontkit') as { create(buffer: Buffer): FontkitFont };

function glyphOf(font: FontkitFont, cp: number): { advanceWidth: number; svg: string } | null {
  try {
    const g = font.glyphForCodePoint(cp);
    return { advanceWidth: g.advanceWidth, svg: g.path.toSVG() };
  } catch {
    return null;
  }
}

const requireHere = createRequire(import.meta.url);
const woffPath = (subset: string, weight: number): string =>
  requireHere.resolve(`@fontsource/ibm-plex-sans/files/ibm-plex-sans-${subset}-${weight}-normal.woff`);

const body: TextStyle = { weight: 400, size: 9, color: '#000000' };

describe('woffToSfnt and readCoverage', () => {
  it.each([
    ['latin', 400],
    ['latin', 600],
    ['greek', 400],
    ['latin-ext', 600],
  ])('when %s %i is unwrapped, then fontkit sees the same glyphs, widths and cmap as in the WOFF', (subset, weight) => {
    const woff = readFileSync(woffPath(subset, weight));
    const sfnt = woffToSfnt(woff);
    const fromWoff = fontkit.create(woff);
    const fromSfnt = fontkit.create(sfnt);

    expect(fromSfnt.numGlyphs).toBe(fromWoff.numGlyphs);
    expect([...fromSfnt.characterSet].sort((a, b) => a - b)).toEqual([...fromWoff.characterSet].sort((a, b) => a - b));
    // fontkit's own WOFF reader throws on empty glyphs that end the glyf table (space, no-break
    // space); those must come out of the unwrapped font as empty outlines. All others must match.
    let compared = 0;
    for (const cp of fromWoff.characterSet) {
      const ours = glyphOf(fromSfnt, cp);
      const theirs = glyphOf(fromWoff, cp);
      if (theirs === null) {
        expect(ours?.svg, `U+${cp.toString(16)}`).toBe('');
        continue;
      }
      expect(ours).toEqual(theirs);
      compared++;
    }
    expect(compared).toBeGreaterThan(fromWoff.characterSet.length - 3);
    const coverage = readCoverage(sfnt);
    const expected = fromWoff.characterSet.filter((cp) => fromWoff.hasGlyphForCodePoint(cp));
    expect([...coverage].sort((a, b) => a - b)).toEqual([...new Set(expected)].sort((a, b) => a - b));
  });

  it('when the file is not a WOFF, then it says so', () => {
    expect(() => woffToSfnt(Buffer.from('not a font at all, just some bytes here....'))).toThrow(/WOFF/);
  });
});

describe('glyph coverage of the report fonts', () => {
  it('when the report prints domain symbols, then every one has a glyph in the chain (fontkit agrees)', () => {
    const symbols = 'εµμ¹²³–—±°·×−’“”';
    expect(uncoveredCharacters(symbols, 400)).toEqual([]);
    expect(uncoveredCharacters(symbols, 600)).toEqual([]);
    // Independent check: for each symbol, some file of the chain has it according to fontkit.
    for (const ch of symbols) {
      const cp = ch.codePointAt(0)!;
      const has = ['latin', 'latin-ext', 'greek'].some((s) => fontkit.create(readFileSync(woffPath(s, 400))).hasGlyphForCodePoint(cp));
      expect(has, ch).toBe(true);
    }
  });

  it('when a character is in no file (superscript minus), then coverage says so, as fontkit does', () => {
    expect(uncoveredCharacters('mM⁻¹', 400)).toEqual(['⁻']);
    for (const face of fontChains()[400]) expect(fontkit.create(face.data).hasGlyphForCodePoint(0x207b)).toBe(false);
  });
});

describe('shapeRuns', () => {
  it('when text mixes Latin and Greek, then the Greek letter is drawn from the greek file', () => {
    const runs = shapeRuns('ε NADH', body);
    expect(runs.map((r) => [r.text, r.face])).toEqual([
      ['ε', 'plex-greek-400'],
      [' NADH', 'plex-latin-400'],
    ]);
  });

  it('when a superscript minus has no glyph, then a smaller raised minus sign stands in', () => {
    const runs = shapeRuns('mM⁻¹', body);
    const minus = runs.find((r) => r.text === '\u2212');
    expect(minus).toBeDefined();
    expect(minus!.size).toBeLessThan(body.size);
    expect(minus!.rise).toBeGreaterThan(0);
    expect(runs.map((r) => r.text).join('')).toBe('mM\u2212¹');
  });

  it('when a symbol has no glyph and no plain form, then it becomes a visible replacement, never a blank', () => {
    expect(shapeRuns('a ≥ b', body).map((r) => r.text).join('')).toBe('a >= b');
    expect(shapeRuns('☃', body).map((r) => r.text).join('')).toBe('?');
  });
});

describe('wrapText', () => {
  const doc = new PDFDocument({ autoFirstPage: false });
  registerFonts(doc);

  it('when words are wrapped, then no line is wider than the box and no word is lost or reordered', () => {
    fc.assert(
      fc.property(
        fc.array(fc.stringMatching(/^[A-Za-zε0-9µ–]{1,14}$/), { minLength: 1, maxLength: 40 }),
        fc.integer({ min: 60, max: 400 }),
        (words, width) => {
          const lines = wrapText(doc, words.join(' '), body, width);
          for (const line of lines) expect(line.width).toBeLessThanOrEqual(width + 1e-6);
          const back = lines.map((l) => l.runs.map((r) => r.text).join('')).join(' ');
          // A word wider than the box is split between characters; otherwise words stay whole.
          if (words.every((w) => textWidth(doc, w, body) <= width)) expect(back.split(' ')).toEqual(words);
          expect(back.replace(/\s+/g, '')).toBe(words.join(''));
        },
      ),
      { numRuns: 60 },
    );
  });

  it('when the text has a blank line, then the paragraph break is kept', () => {
    const lines = wrapText(doc, 'First paragraph.\n\nSecond paragraph.', body, 400);
    expect(lines.map((l) => l.runs.map((r) => r.text).join(''))).toEqual(['First paragraph.', '', 'Second paragraph.']);
  });
});
