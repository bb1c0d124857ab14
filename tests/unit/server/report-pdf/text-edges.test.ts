import PDFDocument from 'pdfkit';
import { describe, expect, it } from 'vitest';
import { registerFonts, shapeRuns, textWidth, uncoveredCharacters, wrapText, type TextStyle } from '../../../../server/domain/report-pdf/text';

/*
 * Edges of the text engine (text.ts), with expectations from outside it:
 * - The Unicode block "Superscripts and Subscripts" runs from U+2070 (SUPERSCRIPT ZERO) to U+209F; U+2070–U+207F are
 *   superscripts and U+2080–U+209C subscripts, and each decomposes under NFKC to its plain letter or digit
 *   (Unicode 15 code charts and UnicodeData.txt <super>/<sub> decompositions) [confirmed]. A superscript must
 *   print raised and smaller, a subscript lowered and smaller [common practice].
 * - Line endings: CR LF and a lone CR end a line as LF does (Unicode Standard §5.8, "Newline Guidelines") [confirmed].
 * - A line may be exactly as wide as its box; only a wider one is broken [derived: "no line is wider than the box"].
 */

const body: TextStyle = { weight: 400, size: 10, color: '#000000' };
const body9: TextStyle = { ...body, size: 9 };
const plain = (text: string): string => shapeRuns(text, body).map((r) => r.text).join('');

describe('shapeRuns: super- and subscripts that no face has', () => {
  it.each([
    ['\u2070', '0'], // the first superscript of the block
    ['\u2074', '4'],
    ['\u207f', 'n'], // the last superscript
  ])('when %s (no glyph in any face) is printed, then its plain form %s stands in, raised and smaller', (ch, form) => {
    expect(uncoveredCharacters(ch)).toEqual([ch]);
    const runs = shapeRuns(`x${ch}`, body);
    const run = runs.find((r) => r.text === form)!;
    expect(run).toBeDefined();
    expect(ch.normalize('NFKC')).toBe(form);
    expect(run.rise).toBeGreaterThan(0);
    expect(run.size).toBeLessThan(body.size);
    expect(run.size).toBeGreaterThan(body.size / 2);
  });

  it.each([
    ['\u2080', '0'], // the first subscript
    ['\u2082', '2'],
    ['\u209c', 't'], // the last subscript letter
  ])('when %s is printed, then %s stands in, lowered and smaller', (ch, form) => {
    expect(uncoveredCharacters(ch)).toEqual([ch]);
    const run = shapeRuns(`CO${ch}`, body).find((r) => r.text === form)!;
    expect(run).toBeDefined();
    expect(run.rise).toBeLessThan(0);
    expect(run.rise).toBeGreaterThan(-body.size / 2);
    expect(run.size).toBeLessThan(body.size);
  });

  it('when a superscript has a glyph of its own (¹, U+00B9), then it is drawn as it is, not synthesised', () => {
    expect(shapeRuns('mM⁻¹', body).find((r) => r.text.includes('¹'))?.rise).toBe(0);
  });

  it('when a symbol has no glyph, then its stand-in is visible ASCII text and keeps apart what the symbols told apart', () => {
    const pairs: Array<[string, string]> = [
      ['≥', '≤'],
      ['→', '←'],
      ['✓', '✗'],
    ];
    for (const [a, b] of pairs) {
      for (const ch of [a, b]) {
        expect(uncoveredCharacters(ch)).toEqual([ch]);
        expect(plain(ch)).toMatch(/^[\x21-\x7e]+$/);
      }
      expect(plain(a)).not.toBe(plain(b));
    }
  });

  it('when text holds a tab, then it prints as a space between the words, never as a box or a question mark', () => {
    expect(plain('a\tb')).toBe('a b');
  });
});

describe('wrapText: edges', () => {
  const doc = new PDFDocument({ autoFirstPage: false });
  registerFonts(doc);

  it('when a word is exactly as wide as the box allows for four letters, then a line of four is kept whole', () => {
    const one = textWidth(doc, 'I', body);
    // The box holds exactly four letters I, added up one at a time.
    const box = one + one + one + one;
    const lines = wrapText(doc, 'IIIIIIII', body, box);
    expect(lines.map((l) => l.runs.map((r) => r.text).join(''))).toEqual(['IIII', 'IIII']);
  });

  it('when a word too long for the box is split, then no piece is wider than the box once its letters are shaped together (kerning)', () => {
    // Found by the wrapping property of fonts-and-text.test.ts (fast-check seed -1987728262): split letter by letter,
    // the first piece's widths added up fitted 60 pt, but shaped as one run it measured 60.003 pt.
    const lines = wrapText(doc, '00\u2013O\u03b50H\u03b5\u03b5H\u2013 a', body9, 60);
    expect(lines.length).toBeGreaterThan(1);
    for (const line of lines) expect(line.width).toBeLessThanOrEqual(60);
    expect(lines.map((l) => l.runs.map((r) => r.text).join('')).join('').replace(/\s+/g, '')).toBe('00\u2013O\u03b50H\u03b5\u03b5H\u2013a');
  });

  it.each([
    ['CR LF', 'First line.\r\nSecond line.'],
    ['a lone CR', 'First line.\rSecond line.'],
  ])('when lines end with %s, then each ends the line and nothing of it is printed', (_name, text) => {
    const lines = wrapText(doc, text, body, 400).map((l) => l.runs.map((r) => r.text).join(''));
    expect(lines).toEqual(['First line.', 'Second line.']);
  });

  it('when the text is empty, then it still takes one (blank) line, so a blank field keeps its row', () => {
    const lines = wrapText(doc, '', body, 400);
    expect(lines).toHaveLength(1);
    expect(lines[0]!.runs).toEqual([]);
    expect(lines[0]!.width).toBe(0);
  });
});
