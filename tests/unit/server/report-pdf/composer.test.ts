import PDFDocument from 'pdfkit';
import { beforeAll, describe, expect, it } from 'vitest';
import { COLORS, Composer, CONTENT_WIDTH, PAGE, STYLES } from '../../../../server/domain/report-pdf/layout';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import { registerFonts, textWidth } from '../../../../server/domain/report-pdf/text';
import {
  buildCorrectedReportDocument,
  buildRejectedReportDocument,
  buildTwoSpecimenReportDocument,
} from '../../../factories/report-document';
import { readDrawing, type DrawnPage } from '../../../factories/pdf-drawing';
import { readPdf } from '../../../factories/pdf-text';
import { faceBottom, latin1InkExtent } from '../../../factories/font-extent';

/*
 * The page geometry and the Composer (layout.ts) checked on PDFs read back with pdfjs-dist, against rules from
 * outside the code:
 * - ISO 216 A4 is 210 × 297 mm = 595.28 × 841.89 pt (1 pt = 1/72 in) [confirmed];
 * - body text is set with a leading of about 120–145% of the type size, and the first baseline of a line box sits
 *   below its top by at least the cap height (about 0.7 em for IBM Plex Sans) and less than the full size plus
 *   a little [common practice];
 * - a heading is never left alone at the foot of a page without room for what follows it [common practice];
 * - text contrast: WCAG 2.1 SC 1.4.3 asks for a contrast ratio of at least 4.5:1 for text under 18 pt, with
 *   relative luminance and ratio as defined in WCAG 2.1's glossary (sRGB, (L1 + 0.05)/(L2 + 0.05)) [confirmed];
 * - the ink of a line stays inside the line box the layout reserved for it, so nothing the layout placed above or
 *   below (a rule, a shaded row, the running header) touches its letters; the letters' real extent is read from the
 *   shipped font files with fontkit (tests/factories/font-extent.ts) [common practice];
 * - something that exactly fits above the content bottom stays on the page ("Content never goes below this",
 *   layout.ts's stated contract: reaching it is allowed) [derived].
 */

const A4 = { width: 595.28, height: 841.89 };

/** WCAG 2.1 relative luminance of an sRGB colour written #rrggbb. */
function luminance(hex: string): number {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) throw new Error(`not a #rrggbb colour: "${hex}"`);
  const [r, g, b] = [m[1], m[2], m[3]].map((h) => {
    const c = parseInt(h!, 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r! + 0.7152 * g! + 0.0722 * b!;
}

function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

// Worked check of the formula itself: black on white is 21:1, a colour on itself 1:1 (WCAG 2.1's definition).
describe('the contrast formula used here', () => {
  it('gives 21 for black on white and 1 for a colour against itself', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
    expect(contrast('#777777', '#777777')).toBe(1);
  });
});

/** Writes what `draw` lays out into a fresh A4 document and returns its bytes and the pages started. */
async function compose(draw: (c: Composer) => void, startY: number = PAGE.contentTop): Promise<{ bytes: Buffer; newPages: number }> {
  const doc = new PDFDocument({ size: 'A4', margin: 0, autoFirstPage: false });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  registerFonts(doc);
  doc.addPage({ size: 'A4', margin: 0 });
  let newPages = 0;
  const c = new Composer(doc, () => (newPages += 1), startY);
  draw(c);
  doc.end();
  return { bytes: await done, newPages };
}

const LONG =
  'Complex I activity is reduced relative to citrate synthase and to complex II, while complex II, III and IV ' +
  'activities are within their intervals; citrate synthase is within its interval. ';

describe('page geometry', () => {
  it('when a page is added, then it is A4 (ISO 216), and the text block is centred with equal margins', async () => {
    expect(PAGE.width).toBeCloseTo((210 / 25.4) * 72, 1);
    expect(PAGE.height).toBeCloseTo((297 / 25.4) * 72, 1);
    const { bytes } = await compose((c) => c.paragraph(LONG.repeat(6), STYLES.body));
    const pdf = await readPdf(bytes);
    const pieces = pdf.pages[0]!.pieces.filter((p) => p.str.trim() !== '');
    const left = Math.min(...pieces.map((p) => p.x));
    const right = Math.max(...pieces.map((p) => p.x + p.w));
    expect(left).toBeCloseTo(PAGE.marginX, 1);
    // Wrapped lines end short of the right margin by less than a word, never past it.
    expect(right).toBeLessThanOrEqual(A4.width - PAGE.marginX + 0.01);
    expect(right).toBeGreaterThan(A4.width - PAGE.marginX - 40);
    // The block runs from the left margin to the same distance from the right edge.
    expect(CONTENT_WIDTH).toBeCloseTo(A4.width - PAGE.marginX - left, 1);
  });
});

describe('Composer.paragraph', () => {
  it('when a paragraph wraps, then its baselines are 120–145% of the type size apart and the first sits about one cap height under the top', async () => {
    for (const style of [STYLES.body, STYLES.small, STYLES.heading]) {
      const top = 200;
      const { bytes } = await compose((c) => c.paragraph(LONG.repeat(3), style), top);
      const page = (await readPdf(bytes)).pages[0]!;
      const baselines = page.baselines.map((y) => A4.height - y);
      expect(baselines.length).toBeGreaterThan(2);
      const steps = baselines.slice(1).map((y, i) => y - baselines[i]!);
      for (const s of steps) {
        expect(s / style.size).toBeGreaterThanOrEqual(1.2);
        expect(s / style.size).toBeLessThanOrEqual(1.45);
      }
      expect((baselines[0]! - top) / style.size).toBeGreaterThanOrEqual(0.7);
      expect((baselines[0]! - top) / style.size).toBeLessThanOrEqual(1.2);
    }
  });

  it('when a paragraph is longer than the page, then it goes on at the top of a new page and no line enters the footer zone', async () => {
    const { bytes, newPages } = await compose((c) => c.paragraph(LONG.repeat(60), STYLES.body));
    const pdf = await readPdf(bytes);
    expect(pdf.pages.length).toBeGreaterThan(1);
    expect(newPages).toBe(pdf.pages.length - 1);
    for (const page of pdf.pages) {
      const fromTop = page.baselines.map((y) => A4.height - y);
      expect(Math.max(...fromTop)).toBeLessThanOrEqual(PAGE.contentBottom);
      // The text continues at the top of the content area, not where the last page stopped.
      expect(Math.min(...fromTop)).toBeLessThan(PAGE.contentTop + 2 * STYLES.body.size);
    }
    // Nothing is lost across the break: every word arrives.
    expect(pdf.flat.split('citrate synthase').length - 1).toBe(2 * 60);
  });

  it('when a blank line between paragraphs falls at the top of a new page, then it is dropped (the page starts with text)', async () => {
    const fresh = await readPdf((await compose((c) => c.paragraph('Second paragraph.', STYLES.body))).bytes);
    // One line fits above the content bottom, the blank line does not: it would open the next page.
    const { bytes } = await compose(
      (c) => {
        c.y = PAGE.contentBottom - 1.05 * STYLES.body.size * 1.45;
        c.paragraph('First paragraph.\n\nSecond paragraph.', STYLES.body);
      },
    );
    const pdf = await readPdf(bytes);
    expect(pdf.pages).toHaveLength(2);
    expect(pdf.pages[0]!.lines).toEqual(['First paragraph.']);
    expect(pdf.pages[1]!.lines).toEqual(['Second paragraph.']);
    expect(pdf.pages[1]!.baselines[0]).toBeCloseTo(fresh.pages[0]!.baselines[0]!, 2);
  });

  it('when x and width are given, then the lines start at x and stay inside the width', async () => {
    const { bytes } = await compose((c) => c.paragraph(LONG.repeat(2), STYLES.small, { x: c.left + 8, width: 200 }));
    const pieces = (await readPdf(bytes)).pages[0]!.pieces.filter((p) => p.str.trim() !== '');
    expect(Math.min(...pieces.map((p) => p.x))).toBeCloseTo(PAGE.marginX + 8, 1);
    expect(Math.max(...pieces.map((p) => p.x + p.w))).toBeLessThanOrEqual(PAGE.marginX + 8 + 200 + 0.01);
  });
});

describe('Composer.singleLine', () => {
  it('when the text is too long, then it is cut at a word and ends with an ellipsis, on one line inside the width', async () => {
    let height = 0;
    const { bytes } = await compose((c) => {
      const block = c.singleLine(LONG, STYLES.body, 150);
      height = block.height;
      expect(block.lines).toHaveLength(1);
      expect(block.lines[0]!.width).toBeLessThanOrEqual(150);
      c.drawBlock(block, c.left, c.y);
    });
    const pdf = await readPdf(bytes);
    expect(pdf.pages[0]!.lines).toHaveLength(1);
    const line = pdf.pages[0]!.lines[0]!;
    expect(line.endsWith('\u2026')).toBe(true);
    // Cut at a word: what stands before the ellipsis is a run of whole words of the text.
    expect(LONG.startsWith(`${line.slice(0, -1)} `)).toBe(true);
    expect(height).toBeGreaterThan(STYLES.body.size);
    expect(height).toBeLessThan(1.5 * STYLES.body.size);
  });

  it('when the text fits, then it is printed whole without an ellipsis', async () => {
    const { bytes } = await compose((c) => c.drawBlock(c.singleLine('Citrate synthase', STYLES.body, 300), c.left, c.y));
    expect((await readPdf(bytes)).pages[0]!.lines).toEqual(['Citrate synthase']);
  });

  it('when one word alone is wider than the box, then only its first line-full is kept', async () => {
    const { bytes } = await compose((c) => {
      const block = c.singleLine('Succinate:cytochrome-c-oxidoreductase-with-a-very-long-name', STYLES.body, 60);
      expect(block.lines).toHaveLength(1);
      c.drawBlock(block, c.left, c.y);
    });
    const lines = (await readPdf(bytes)).pages[0]!.lines;
    expect(lines).toHaveLength(1);
    expect('Succinate:cytochrome-c-oxidoreductase-with-a-very-long-name'.startsWith(lines[0]!)).toBe(true);
  });
});

describe('Composer.heading', () => {
  it('when too little room is left under a heading for what must follow it, then the heading moves to the next page', async () => {
    const keep = 40;
    // About half the room the heading and what follows need: the heading must not stay at the foot.
    const { bytes, newPages } = await compose((c) => {
      c.y = PAGE.contentBottom - keep / 2;
      c.heading('Methods and traceability', keep);
      c.paragraph('First line of the section.', STYLES.body);
    });
    const pdf = await readPdf(bytes);
    expect(newPages).toBe(1);
    expect(pdf.pages[0]!.flat).toBe('');
    expect(pdf.pages[1]!.lines).toEqual(['Methods and traceability', 'First line of the section.']);
  });

  it('when there is clearly room, then the heading stays, with a rule under it and above the text that follows', async () => {
    const keep = 40;
    const { bytes, newPages } = await compose((c) => {
      c.y = PAGE.contentBottom - 3 * keep;
      c.heading('Methods and traceability', keep);
      c.paragraph('First line of the section.', STYLES.body);
    });
    expect(newPages).toBe(0);
    const pdf = await readPdf(bytes);
    const drawn = (await readDrawing(bytes))[0]!;
    const [headingY, textY] = pdf.pages[0]!.baselines;
    const rule = drawn.shapes.find((s) => s.kind === 'stroke' && Math.abs(s.y1 - s.y2) < 0.01);
    expect(rule).toBeDefined();
    expect(rule!.y1).toBeLessThan(headingY!);
    expect(rule!.y1).toBeGreaterThan(textY! + STYLES.body.size * 0.7);
    // The rule spans the text block.
    expect(rule!.x1).toBeCloseTo(PAGE.marginX, 1);
    expect(rule!.x2).toBeCloseTo(A4.width - PAGE.marginX, 1);
  });
});

describe('Composer.drawBlock alignment', () => {
  it('when a block is aligned right or centred in a box, then its line ends at the box edge or sits in the middle', async () => {
    const boxX = 100;
    const boxW = 300;
    const { bytes } = await compose((c) => {
      c.drawBlock(c.measure('Right', STYLES.body, boxW), boxX, 100, 'right', boxW);
      c.drawBlock(c.measure('Centre', STYLES.body, boxW), boxX, 130, 'center', boxW);
      c.drawBlock(c.measure('Left', STYLES.body, boxW), boxX, 160);
    });
    const pieces = (await readPdf(bytes)).pages[0]!.pieces;
    const at = (s: string) => pieces.find((p) => p.str === s)!;
    expect(at('Right').x + at('Right').w).toBeCloseTo(boxX + boxW, 1);
    expect(at('Centre').x + at('Centre').w / 2).toBeCloseTo(boxX + boxW / 2, 1);
    expect(at('Left').x).toBeCloseTo(boxX, 1);
  });
});

describe('the palette on the printed page (WCAG 2.1 SC 1.4.3)', () => {
  let pages: DrawnPage[];

  beforeAll(async () => {
    const docs = [buildTwoSpecimenReportDocument(), buildCorrectedReportDocument(), buildRejectedReportDocument()];
    // A missing ratio prints "not available" in the bar graphic.
    const two = docs[0]!;
    two.specimens[0]!.graphic.bars[0]!.pctOfMeanRatioCii = null;
    pages = [];
    for (const d of docs) pages.push(...(await readDrawing(await renderReportPdf(d))));
  }, 120_000);

  it('when any report is printed, then every piece of text has a contrast of at least 4.5:1 with what lies under it', () => {
    const low: string[] = [];
    let checked = 0;
    for (const page of pages) {
      for (const t of page.texts) {
        if (t.text.trim() === '') continue;
        // What lies under the start of the text: the last fill painted before it that covers that point, else paper.
        const under = page.shapes
          .filter((s) => s.kind === 'fill' && s.order < t.order && s.x1 <= t.x + 0.5 && s.x2 >= t.x + 0.5 && s.y1 <= t.y + 1 && s.y2 >= t.y + 1)
          .sort((a, b) => b.order - a.order)[0];
        const ground = under?.color ?? '#ffffff';
        checked += 1;
        if (contrast(t.color, ground) < 4.5) low.push(`"${t.text}" ${t.color} on ${ground}: ${contrast(t.color, ground).toFixed(2)}`);
      }
    }
    expect(checked).toBeGreaterThan(100);
    expect(low).toEqual([]);
  });

  it('when the palette is read, then every entry is a #rrggbb colour (pdfkit ignores any other string and keeps the previous colour)', () => {
    for (const [name, value] of Object.entries(COLORS)) expect(value, name).toMatch(/^#[0-9a-f]{6}$/i);
    for (const [name, style] of Object.entries(STYLES)) expect(style.color, name).toMatch(/^#[0-9a-f]{6}$/i);
  });
});

describe('the line box and the letters in it', () => {
  it('when a line holds the tallest and the deepest Latin-1 letters, then their ink stays inside the line box in every style', async () => {
    // Read with fontkit from the WOFF files: the tallest printable Latin-1 letter is Å (0.976 em in the regular face,
    // 0.996 em in SemiBold, ring included), the deepest is g (0.212 em below the baseline). So at 10.5 pt SemiBold
    // (the heading) the baseline must stand at least 0.996 × 10.5 = 10.458 pt under the top of its box.
    expect([latin1InkExtent(400).topChar, latin1InkExtent(600).topChar]).toEqual(['Å', 'Å']);
    const top = 200;
    for (const [name, style] of Object.entries(STYLES)) {
      const ink = latin1InkExtent(style.weight);
      let boxBottom = 0;
      const { bytes } = await compose((c) => {
        c.paragraph(`Line ${ink.topChar}${ink.bottomChar}`, style);
        boxBottom = c.y;
      }, top);
      const page = (await readPdf(bytes)).pages[0]!;
      expect(page.lines, name).toEqual([`Line ${ink.topChar}${ink.bottomChar}`]);
      const baseline = A4.height - page.baselines[0]!;
      expect(baseline - ink.top * style.size, `${name}: top of ${ink.topChar} against the top of its box`).toBeGreaterThanOrEqual(top - 0.001);
      expect(baseline - ink.bottom * style.size, `${name}: foot of ${ink.bottomChar} against the foot of its box`).toBeLessThanOrEqual(boxBottom + 0.001);
    }
  });

  it('when a block exactly reaches the content bottom, then it stays on the page; 0.01 pt taller, it starts a new page', async () => {
    // Worked by hand: the content bottom is 841.89 − 62 = 779.89 pt from the top; from y = 700 a block of 79.89 pt
    // ends exactly there (both sums are exact in binary floating point: checked below).
    const y = 700;
    const fits = PAGE.contentBottom - y;
    expect(y + fits).toBe(PAGE.contentBottom);
    for (const [height, pagesAdded] of [
      [fits, 0],
      [fits + 0.01, 1],
    ] as const) {
      const { newPages } = await compose((c) => c.ensure(height), y);
      expect(newPages, `a block of ${height} pt from y = ${y}`).toBe(pagesAdded);
    }
  });

  it('when a blank line separates two paragraphs in the middle of a page, then it keeps its line: the gap is twice a line step', async () => {
    const baselines = async (text: string): Promise<number[]> =>
      (await readPdf((await compose((c) => c.paragraph(text, STYLES.body), 300)).bytes)).pages[0]!.baselines;
    const [a, b] = await baselines('First paragraph.\nSecond paragraph.');
    const [c, d] = await baselines('First paragraph.\n\nSecond paragraph.');
    expect((c! - d!) / (a! - b!)).toBeCloseTo(2, 6);
  });
});

describe('Composer.singleLine and runs of blanks', () => {
  it('when the source text has two spaces between words, then a cut line still ends with the ellipsis straight after the last whole word', async () => {
    // [common practice] A cut text ends with "…" right after the last character kept (as CSS text-overflow: ellipsis
    // does); a run of blanks in the source prints as one space (the wrapper's rule, text.ts). The box is made just
    // wide enough for "Complex I activity …" (with a space) and too narrow for "Complex I activity is…", so the
    // longest run of whole words that fits is "Complex I activity".
    const text = 'Complex I activity  is reduced relative to citrate synthase';
    const { bytes } = await compose((c) => {
      const width = textWidth(c.doc, 'Complex I activity \u2026', STYLES.body) + 0.5;
      expect(textWidth(c.doc, 'Complex I activity is\u2026', STYLES.body)).toBeGreaterThan(width);
      c.drawBlock(c.singleLine(text, STYLES.body, width), c.left, c.y);
    });
    expect((await readPdf(bytes)).pages[0]!.lines).toEqual(['Complex I activity\u2026']);
  });
});

describe('Composer.heading: its rule and what it keeps with it', () => {
  it('when a heading has letters with descenders, then its rule lies below the deepest ink any glyph of its face can have', async () => {
    // The face's deepest glyph reaches 0.266 em under the baseline (SemiBold, 'head' yMin read with fontkit): at
    // 10.5 pt that is 2.79 pt. The rule's stroke (its width read from the page) must lie wholly below that.
    const { bytes } = await compose((c) => c.heading('Typology of the assay, by query', 40), 300);
    const baseline = (await readPdf(bytes)).pages[0]!.baselines[0]!;
    const rule = (await readDrawing(bytes))[0]!.shapes.find((s) => s.kind === 'stroke' && Math.abs(s.y1 - s.y2) < 0.01)!;
    expect(rule).toBeDefined();
    const deepestInk = baseline + faceBottom(STYLES.heading.weight) * STYLES.heading.size;
    expect(rule.y1 + rule.lineWidth / 2).toBeLessThanOrEqual(deepestInk);
  });

  it('when a heading is placed ever lower near the foot of the page, then the first line after it is always on its page, and it moves only when both do not fit', async () => {
    // The heading is kept with one line of body text (keepWith = that line's height). How far a heading moves the
    // cursor (title, rule and gap) is measured where there is room; the pair fits when start + that + one line
    // reaches no lower than the content bottom. Start positions step 1 pt across that limit, half a point off it.
    let footprint = 0;
    let keep = 0;
    await compose((c) => {
      keep = c.measure('First line of the section.', STYLES.body, c.width).height;
      c.heading('Methods and traceability', keep);
      footprint = c.y - 300;
    }, 300);
    const limit = PAGE.contentBottom - footprint - keep;
    for (let d = -4.5; d <= 13.5; d += 1) {
      const start = limit + d;
      const { bytes } = await compose((c) => {
        c.heading('Methods and traceability', keep);
        c.paragraph('First line of the section.', STYLES.body);
      }, start);
      const pages = (await readPdf(bytes)).pages;
      const pageOf = (text: string): number => pages.findIndex((p) => p.lines.includes(text));
      expect(pageOf('First line of the section.'), `start ${start.toFixed(2)}`).toBe(pageOf('Methods and traceability'));
      expect(pageOf('Methods and traceability'), `start ${start.toFixed(2)}`).toBe(d < 0 ? 0 : 1);
    }
  });
});
