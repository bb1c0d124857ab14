import { beforeAll, describe, expect, it } from 'vitest';
import type { ReportDocument, ReportGraphic } from '@/schemas/report-document';
import { axisMaximum } from '../../../../server/domain/report-pdf/bar-graphic';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import { buildReportDocument, muscleSection } from '../../../factories/report-document';
import { readDrawing, type DrawnPage, type Shape } from '../../../factories/pdf-drawing';
import { readPdf, type Piece, type ReadPdf } from '../../../factories/pdf-text';

/*
 * The bar graphic checked on the page it prints, read back with pdfjs-dist (text pieces and the operator list:
 * every filled and stroked path with its colour), never with a coordinate taken from bar-graphic.ts:
 * - a bar chart's scale is linear and starts at 0: the distance between grid lines is the same for each 50%, and
 *   a bar's length over the axis length is its value over the axis end [common practice];
 * - each tick label stands centred under its grid line [common practice];
 * - the axis end follows the graphic's stated rule, "at least 150%, rounded up to the next 50%, at most 300%;
 *   longer bars are cut and labelled with their value" (worked by hand below) [derived];
 * - the criterion bands are shaded from 0 to the major limit and from there to the minor limit of the document's
 *   rule set, behind all the bars [derived];
 * - each series' legend swatch has the colour of that series' bars, and the two series differ [common practice];
 * - a value label stands on its bar's row, right of the bar's end, on a white patch painted over the 100% line
 *   (so no line crosses the figure) [derived].
 */

const near = (a: number, b: number, tol = 0.5): boolean => Math.abs(a - b) <= tol;

interface Figure {
  doc: ReportDocument;
  graphic: ReportGraphic;
  text: ReadPdf;
  page: DrawnPage;
  pieces: Piece[];
}

/** The page that holds the graphic: the one with the legend. */
async function figureOf(doc: ReportDocument): Promise<Figure> {
  const bytes = await renderReportPdf(doc);
  const text = await readPdf(bytes);
  const drawing = await readDrawing(bytes);
  const n = text.pages.findIndex((p) => p.flat.includes('Ratio to citrate synthase (CS)'));
  if (n < 0) throw new Error('no bar graphic in the report');
  return { doc, graphic: doc.specimens[0]!.graphic, text, page: drawing[n]!, pieces: text.pages[n]!.pieces };
}

function pieceOf(f: Figure, str: string): Piece {
  const p = f.pieces.find((x) => x.str.trim() === str);
  if (!p) throw new Error(`"${str}" is not printed on the graphic's page`);
  return p;
}

/** The axis labels printed under the plot ("0%", "50%", …), left to right. */
function axisLabels(f: Figure): Array<{ pct: number; centre: number; y: number }> {
  const zero = pieceOf(f, '0%');
  return f.pieces
    .filter((p) => /^\d+%$/.test(p.str.trim()) && near(p.y, zero.y))
    .map((p) => ({ pct: Number(p.str.trim().replace('%', '')), centre: p.x + p.w / 2, y: p.y }))
    .sort((a, b) => a.centre - b.centre);
}

const vertical = (s: Shape): boolean => s.kind === 'stroke' && near(s.x1, s.x2, 0.01) && s.y2 - s.y1 > 20;

/** Where the plot's 0% and its axis end stand, from the grid lines under the labels. */
function scale(f: Figure): { x0: number; xEnd: number; end: number; xOf: (pct: number) => number } {
  const labels = axisLabels(f);
  const first = labels[0]!;
  const last = labels[labels.length - 1]!;
  const lineAt = (x: number): Shape => {
    const line = f.page.shapes.find((s) => vertical(s) && near(s.x1, x, 1));
    if (!line) throw new Error(`no grid line at ${x}`);
    return line;
  };
  const x0 = lineAt(first.centre).x1;
  const xEnd = lineAt(last.centre).x1;
  return { x0, xEnd, end: last.pct, xOf: (pct) => x0 + (Math.min(pct, last.pct) / last.pct) * (xEnd - x0) };
}

/** The colour of a legend entry's swatch: the small filled box just left of its text. */
function swatchColour(f: Figure, legend: string): string {
  const label = f.pieces.find((p) => p.str.startsWith(legend));
  if (!label) throw new Error(`no legend "${legend}"`);
  const box = f.page.shapes.find(
    (s) => s.kind === 'fill' && s.x2 <= label.x && label.x - s.x2 < 8 && s.x2 - s.x1 < 20 && s.y1 <= label.y + 6 && s.y2 >= label.y - 2,
  );
  if (!box) throw new Error(`no swatch beside "${legend}"`);
  return box.color;
}

/** Bars: filled boxes of a series colour starting at the plot's 0%, top to bottom. */
function barsOf(f: Figure, colour: string, x0: number): Shape[] {
  return f.page.shapes
    .filter((s) => s.kind === 'fill' && s.color === colour && near(s.x1, x0, 0.01) && s.y2 - s.y1 < 12)
    .sort((a, b) => b.y2 - a.y2);
}

describe('axisMaximum: the end of the axis (worked by hand from the stated rule)', () => {
  const graphic = (values: Array<number | null>): ReportGraphic => ({
    bars: values.map((v) => ({ assay: 'CI', pctOfMeanRatioCs: v, pctOfMeanRatioCii: null })),
    criterionBands: null,
  });

  it.each([
    [[40, 90], 150], // nothing reaches 150: the floor
    [[150], 150], // exactly 150: 150
    [[150.01], 200], // just over 150: the next 50 up
    [[199.9, null], 200],
    [[200], 200],
    [[200.5], 250],
    [[250.1], 300],
    [[300], 300],
    [[300.01], 300], // past 300: cut at 300
    [[412], 300],
    [[null, null], 150], // no value at all: the floor
  ])('when the largest value is %j, then the axis ends at %i%', (values, end) => {
    expect(axisMaximum(graphic(values))).toBe(end);
  });

  it('when the larger value is in the CII series, then it sets the axis as well', () => {
    expect(axisMaximum({ bars: [{ assay: 'CI', pctOfMeanRatioCs: 20, pctOfMeanRatioCii: 233 }], criterionBands: null })).toBe(250);
  });
});

describe('the bar graphic on the page', () => {
  let plain: Figure;
  let wide: Figure;
  let exact: Figure;

  beforeAll(async () => {
    plain = await figureOf(buildReportDocument());
    // One bar past the axis end (412%), one exactly at 100%, one tiny (0.1%), one missing, bands at 20 and 30%.
    const muscle = muscleSection();
    const graphic: ReportGraphic = {
      bars: [
        { assay: 'CI', pctOfMeanRatioCs: 412, pctOfMeanRatioCii: null },
        { assay: 'CII', pctOfMeanRatioCs: 100, pctOfMeanRatioCii: 250 },
        { assay: 'CIII', pctOfMeanRatioCs: 0.1, pctOfMeanRatioCii: 175 },
      ],
      criterionBands: { majorBelowPct: 20, minorBelowPct: 30, ruleSetLabel: 'demo rule set v1' },
    };
    wide = await figureOf(buildReportDocument({ specimens: [{ ...muscle, graphic }] }));
    // The largest values exactly at the axis end, 150%, in either series: nothing is cut.
    const atEnd: ReportGraphic = {
      bars: [
        { assay: 'CI', pctOfMeanRatioCs: 150, pctOfMeanRatioCii: 50 },
        { assay: 'CII', pctOfMeanRatioCs: 20, pctOfMeanRatioCii: 150 },
      ],
      criterionBands: null,
    };
    exact = await figureOf(buildReportDocument({ specimens: [{ ...muscle, graphic: atEnd }] }));
  }, 120_000);

  it('when read back, then the axis is labelled every 50% from 0 to its end: 150% for the demo case, 300% with a bar of 412%', () => {
    expect(axisLabels(plain).map((l) => l.pct)).toEqual([0, 50, 100, 150]);
    expect(axisLabels(wide).map((l) => l.pct)).toEqual([0, 50, 100, 150, 200, 250, 300]);
  });

  it('when read back, then every tick label is centred under its grid line, and the grid lines are evenly spaced (a linear scale)', () => {
    for (const f of [plain, wide]) {
      const labels = axisLabels(f);
      const lines = f.page.shapes.filter(vertical);
      const xs = labels.map((l) => {
        const line = lines.find((s) => near(s.x1, l.centre, 0.5));
        expect(line, `grid line under ${l.pct}%`).toBeDefined();
        return line!.x1;
      });
      const steps = xs.slice(1).map((x, i) => x - xs[i]!);
      for (const s of steps) expect(s).toBeCloseTo(steps[0]!, 1);
      expect(steps[0]!).toBeGreaterThan(20);
    }
  });

  it('when read back, then the 100% line is dashed and drawn after (over) every bar', () => {
    for (const f of [plain, wide]) {
      const { xOf } = scale(f);
      const dashed = f.page.shapes.filter((s) => vertical(s) && s.dashed);
      expect(dashed).toHaveLength(1);
      expect(dashed[0]!.x1).toBeCloseTo(xOf(100), 1);
      // The dashed line is the only line at 100%: no solid grid line under it.
      expect(f.page.shapes.filter((s) => vertical(s) && near(s.x1, xOf(100), 0.5))).toHaveLength(1);
      const lastBar = Math.max(...f.page.shapes.filter((s) => s.kind === 'fill' && s.y2 - s.y1 < 12 && s.color !== '#ffffff').map((s) => s.order));
      expect(dashed[0]!.order).toBeGreaterThan(lastBar);
    }
  });

  it('when read back, then each bar is as long as its value on the axis, in its series colour, a cut bar ending at the axis end', () => {
    for (const f of [plain, wide]) {
      const { x0, xEnd, end } = scale(f);
      const cs = swatchColour(f, 'Ratio to citrate synthase (CS)');
      const cii = swatchColour(f, 'Ratio to complex II (CII)');
      expect(cs).not.toBe(cii);
      for (const [colour, key] of [
        [cs, 'pctOfMeanRatioCs'],
        [cii, 'pctOfMeanRatioCii'],
      ] as const) {
        const values = f.graphic.bars.map((b) => b[key]).filter((v): v is number => v !== null);
        const bars = barsOf(f, colour, x0);
        expect(bars).toHaveLength(values.length);
        bars.forEach((bar, i) => {
          const expected = (Math.min(values[i]!, end) / end) * (xEnd - x0);
          // A bar too short to see is drawn as a sliver of at least half a point.
          if (expected < 0.5) expect(bar.x2 - bar.x1).toBeGreaterThanOrEqual(0.5);
          else expect(bar.x2 - bar.x1).toBeCloseTo(expected, 1);
        });
      }
    }
  });

  it("when read back, then each row is named by its complex, level with its two bars, rows in the document's order and no bars overlapping", () => {
    for (const f of [plain, wide]) {
      const { x0 } = scale(f);
      const rowLabels = (name: string): Piece[] => f.pieces.filter((p) => p.str.trim() === name && p.x < x0).sort((a, b) => b.y - a.y);
      const toCs = rowLabels('to CS');
      const toCii = rowLabels('to CII');
      expect(toCs).toHaveLength(f.graphic.bars.length);
      expect(toCii).toHaveLength(f.graphic.bars.length);
      f.graphic.bars.forEach((bar, i) => {
        const top = toCs[i]!.y + toCs[i]!.h;
        const bottom = toCii[i]!.y - 0.3 * toCii[i]!.h;
        const code = f.pieces.find((p) => p.str.trim() === bar.assay && p.x < toCs[i]!.x && p.y <= top && p.y >= bottom);
        expect(code, `${bar.assay} beside its bars`).toBeDefined();
        if (i > 0) expect(toCs[i]!.y).toBeLessThan(toCii[i - 1]!.y);
      });
      const all = f.page.shapes.filter((s) => s.kind === 'fill' && near(s.x1, x0, 0.01) && s.y2 - s.y1 < 12);
      for (let a = 0; a < all.length; a++) {
        for (let b = a + 1; b < all.length; b++) {
          const oy = Math.min(all[a]!.y2, all[b]!.y2) - Math.max(all[a]!.y1, all[b]!.y1);
          expect(oy, 'bars overlap').toBeLessThanOrEqual(0.01);
        }
      }
    }
  });

  it('when read back, then each value is printed right after the end of its bar, on its row, over a white patch laid after the 100% line', () => {
    for (const f of [plain, wide]) {
      const { x0 } = scale(f);
      const dashed = f.page.shapes.find((s) => vertical(s) && s.dashed)!;
      const axisY = axisLabels(f)[0]!.y;
      const bars = f.page.shapes.filter((s) => s.kind === 'fill' && near(s.x1, x0, 0.01) && s.y2 - s.y1 < 12);
      const values = f.pieces.filter((p) => /%$/.test(p.str.trim()) && p.x > x0 && !near(p.y, axisY));
      expect(values).toHaveLength(bars.length);
      for (const bar of bars) {
        const label = values.find((p) => p.y >= bar.y1 - 0.5 && p.y <= bar.y2 && p.x >= bar.x2 && p.x - bar.x2 < 6);
        expect(label, `label after the bar ending at ${bar.x2.toFixed(1)}`).toBeDefined();
        const patch = f.page.shapes.find(
          (s) => s.kind === 'fill' && s.color === '#ffffff' && s.order > dashed.order && s.x1 <= label!.x && s.x2 >= label!.x + label!.w && s.y1 <= label!.y && s.y2 >= label!.y + 0.5 * label!.h,
        );
        expect(patch, `white patch under ${label!.str}`).toBeDefined();
      }
    }
  });

  it('when a value is past the axis end, then its bar stops at the end with a white notch, its value is printed and the caption says so', () => {
    const { x0, xEnd } = scale(wide);
    const cs = barsOf(wide, swatchColour(wide, 'Ratio to citrate synthase (CS)'), x0);
    const cut = cs[0]!;
    expect(cut.x2).toBeCloseTo(xEnd, 1);
    const notch = wide.page.shapes.find(
      (s) => s.kind === 'stroke' && s.color === '#ffffff' && s.x1 > xEnd - 15 && s.x2 <= xEnd && s.y2 >= cut.y1 && s.y1 <= cut.y2,
    );
    expect(notch).toBeDefined();
    expect(wide.pieces.some((p) => p.str.trim() === '412%')).toBe(true);
    expect(wide.text.flat).toContain('Bars beyond 300% are cut at the edge and labelled with their value.');
    // Nothing is cut in the demo case: no notch, no such sentence.
    expect(plain.page.shapes.some((s) => s.kind === 'stroke' && s.color === '#ffffff')).toBe(false);
    expect(plain.text.flat).not.toContain('are cut at the edge');
  });

  it('when the largest values are exactly at the axis end (150%), then those bars reach the end whole: no notch, no cut named', () => {
    const { x0, xEnd, end } = scale(exact);
    expect(end).toBe(150);
    const ends = exact.page.shapes.filter((s) => s.kind === 'fill' && near(s.x1, x0, 0.01) && s.y2 - s.y1 < 12 && near(s.x2, xEnd, 0.1));
    expect(ends).toHaveLength(2);
    expect(exact.page.shapes.some((s) => s.kind === 'stroke' && s.color === '#ffffff')).toBe(false);
    expect(exact.text.flat).not.toContain('are cut at the edge');
    expect(exact.text.flat).not.toContain('Shading shows');
  });

  it('when a value is missing, then its row says "not available" beside the axis instead of a bar', () => {
    const { x0 } = scale(wide);
    const toCii = wide.pieces.filter((p) => p.str.trim() === 'to CII' && p.x < x0).sort((a, b) => b.y - a.y)[0]!;
    const none = wide.pieces.find((p) => p.str.trim() === 'not available');
    expect(none).toBeDefined();
    expect(none!.y).toBeCloseTo(toCii.y, 1);
    expect(none!.x).toBeGreaterThan(x0);
    expect(none!.x - x0).toBeLessThan(10);
  });

  it("when the rule set has criterion bands, then they are shaded from 0 to the major limit and on to the minor limit, behind the bars, and named in the legend and caption", () => {
    for (const f of [plain, wide]) {
      const { x0, xOf } = scale(f);
      const bands = f.graphic.criterionBands!;
      const major = swatchColour(f, `Major-criterion band (below ${bands.majorBelowPct}%)`);
      const minor = swatchColour(f, `Minor-criterion band (${bands.majorBelowPct}\u2013${bands.minorBelowPct}%)`);
      expect(major).not.toBe(minor);
      const bars = f.page.shapes.filter((s) => s.kind === 'fill' && near(s.x1, x0, 0.01) && s.y2 - s.y1 < 12);
      const shade = (colour: string): Shape => {
        const s = f.page.shapes.find((x) => x.kind === 'fill' && x.color === colour && x.y2 - x.y1 > 20);
        expect(s, colour).toBeDefined();
        return s!;
      };
      const m = shade(major);
      const n = shade(minor);
      expect(m.x1).toBeCloseTo(x0, 1);
      expect(m.x2).toBeCloseTo(xOf(bands.majorBelowPct), 1);
      expect(n.x1).toBeCloseTo(xOf(bands.majorBelowPct), 1);
      expect(n.x2).toBeCloseTo(xOf(bands.minorBelowPct), 1);
      for (const s of [m, n]) {
        expect(s.y1).toBeLessThanOrEqual(Math.min(...bars.map((b) => b.y1)));
        expect(s.y2).toBeGreaterThanOrEqual(Math.max(...bars.map((b) => b.y2)));
        expect(s.order).toBeLessThan(Math.min(...bars.map((b) => b.order)));
      }
      expect(f.text.flat).toContain(`Shading shows the criterion bands of ${bands.ruleSetLabel}.`);
    }
  });

  it('when the graphic is drawn, then it stays inside the text block: nothing left of the margin of the text above or past its right edge', () => {
    for (const f of [plain, wide]) {
      const heading = f.pieces.find((p) => p.str.includes('Activity as % of reference mean'))!;
      const rightEdge = Math.max(...f.page.shapes.filter((s) => s.kind === 'stroke' && near(s.y1, s.y2, 0.01)).map((s) => s.x2));
      const { x0 } = scale(f);
      const graphicShapes = f.page.shapes.filter((s) => s.y2 < heading.y && s.y1 > axisLabels(f)[0]!.y - 5);
      for (const s of graphicShapes) {
        expect(s.x1).toBeGreaterThanOrEqual(heading.x - 0.01);
        expect(s.x2).toBeLessThanOrEqual(rightEdge + 0.01);
      }
      expect(x0).toBeGreaterThan(heading.x);
    }
  });

  it('when no complex has a ratio to plot (citrate synthase alone), then no graphic, heading or legend is printed', async () => {
    const muscle = muscleSection();
    const csOnly = muscle.results.filter((r) => r.assay === 'CS');
    expect(csOnly.length).toBeGreaterThan(0);
    const doc = buildReportDocument({
      specimens: [{ ...muscle, results: csOnly, graphic: { bars: [], criterionBands: muscle.graphic.criterionBands } }],
    });
    const text = await readPdf(await renderReportPdf(doc));
    expect(text.flat).toContain('Citrate synthase');
    expect(text.flat).not.toContain('Activity as % of reference mean');
    expect(text.flat).not.toContain('Ratio to citrate synthase (CS)');
  });
});
