import { beforeAll, describe, expect, it } from 'vitest';
import { PAGE } from '../../../../server/domain/report-pdf/layout';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import { buildReportDocument, buildTwoSpecimenReportDocument, muscleSection, withResultRow } from '../../../factories/report-document';
import { readPdf } from '../../../factories/pdf-text';
import { readDrawing, type DrawnPage, type TextRun } from '../../../factories/pdf-drawing';

/*
 * The results table as printed, read back with pdfjs-dist's operator list (text with its font and colour, fills):
 * - a result outside its interval is marked the same way whichever side it lies on, and differently from one within
 *   it: ISO 15189:2022 §7.4.1.6 asks that results outside the reference interval be identified [from memory]; the
 *   words say it (tested in render-report-pdf.test.ts), and the emphasis must not favour one side [derived];
 * - alternate assays of a long table are shaded so the eye keeps its row across the page [common practice];
 * - in a report with several specimens every line about a measurement names its specimen, or it could be read
 *   against the wrong one (CLIA 42 CFR 493.1291(c)(5): the report identifies the specimen source [confirmed];
 *   the naming rule is derived from it).
 */

/** ISO 216 A4 height in points [confirmed]. */
const A4_HEIGHT = 841.89;
const SEMIBOLD = /IBMPlexSans-SemiBold$/;
const REGULAR = /IBMPlexSans-Regular$/;

describe('the results table', () => {
  let page: DrawnPage;

  beforeAll(async () => {
    // Citrate synthase raised above its interval (80.0–220.0, mean 140.0): 250 is 179% of the mean.
    const doc = withResultRow(buildReportDocument(), 0, 'CS', 'activity', (r) => ({
      ...r,
      value: 250,
      status: 'above',
      pctOfMean: (250 / 140) * 100,
      criterionBand: null,
    }));
    page = (await readDrawing(await renderReportPdf(doc)))[0]!;
  }, 120_000);

  const statusRuns = (words: string): TextRun[] => page.texts.filter((t) => t.text === words);

  it('when results lie below and above their intervals, then both status words are printed in the same bold face, and within in the regular face', () => {
    const below = statusRuns('Below interval');
    const above = statusRuns('Above interval');
    const within = statusRuns('Within interval');
    expect(below.length).toBeGreaterThan(0);
    expect(above).toHaveLength(1);
    expect(within.length).toBeGreaterThan(0);
    for (const t of [...below, ...above]) expect(t.font).toMatch(SEMIBOLD);
    for (const t of within) expect(t.font).toMatch(REGULAR);
    // Each side in a colour of its own, neither the body ink of a result within its interval.
    expect(new Set(below.map((t) => t.color)).size).toBe(1);
    expect(above[0]!.color).not.toBe(below[0]!.color);
    expect(above[0]!.color).not.toBe(within[0]!.color);
    expect(below[0]!.color).not.toBe(within[0]!.color);
  });

  it('when the table lists several assays, then every second assay (the 2nd, 4th, 6th) is shaded across the table and the others are not', () => {
    const codes = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS'];
    const assayCells = codes.map((code) => {
      const t = page.texts.find((x) => x.text === code && x.x < 60 && SEMIBOLD.test(x.font));
      expect(t, code).toBeDefined();
      return t!;
    });
    const first = page.texts.find((x) => x.text === 'Assay')!;
    const wide = page.shapes.filter((s) => s.kind === 'fill' && s.order > first.order && s.x2 - s.x1 > 400 && s.y2 - s.y1 > 10 && s.y2 < first.y);
    const shadedUnder = (t: TextRun) => wide.some((s) => s.y1 <= t.y && s.y2 >= t.y + 0.5 * t.size && s.order < t.order);
    expect(assayCells.map(shadedUnder)).toEqual([false, true, false, true, false, true, false]);
  });
});

describe('excluded replicates', () => {
  const replicate = {
    specimenLabel: 'B',
    assay: 'CIV' as const,
    replicate: 2,
    value: 12.1,
    unit: 'nmol/min/mg protein',
    reason: 'Air bubble in the cuvette',
    by: 'Tech Demo One',
  };

  it('when a report has two specimens and only one has an excluded replicate, then the line still names its specimen', async () => {
    const doc = buildTwoSpecimenReportDocument({ methods: { excludedReplicates: [replicate] } });
    const pdf = await readPdf(await renderReportPdf(doc));
    expect(pdf.flat).toContain('Excluded replicate: specimen B, CIV, replicate 2, 12.1 nmol/min/mg protein:');
  });

  it('when the report has one specimen, then the line needs no specimen name', async () => {
    const doc = buildReportDocument({ methods: { excludedReplicates: [{ ...replicate, specimenLabel: 'A' }] } });
    const pdf = await readPdf(await renderReportPdf(doc));
    expect(pdf.flat).toContain('Excluded replicate: CIV, replicate 2, 12.1 nmol/min/mg protein:');
  });
});

describe('reference intervals used', () => {
  it('when two specimens of one type were compared with the same interval version, then each row is listed once under it', async () => {
    const muscle = muscleSection();
    const doc = buildReportDocument({
      specimens: [
        { ...muscle, specimen: { ...muscle.specimen, label: 'A' } },
        { ...muscle, specimen: { ...muscle.specimen, label: 'B' } },
      ],
    });
    const pdf = await readPdf(await renderReportPdf(doc));
    const start = pdf.flat.indexOf('Reference intervals used');
    const end = pdf.flat.indexOf('Electronic signature');
    expect(start).toBeGreaterThan(0);
    const listed = pdf.flat.slice(start, end);
    expect(listed.match(/interval version 3:/g)).toHaveLength(1);
    expect(listed.match(/\bCI activity\b/g)).toHaveLength(1);
    expect(listed.match(/\bCS activity\b/g)).toHaveLength(1);
  });
});

describe('the note under the results table', () => {
  it('when the table ends near the foot of a page, then its last assay and the note explaining it stay together above the footer', async () => {
    // Each step lengthens the clinical indication by about one line, moving the table's end down the first page
    // past the point where the last row fits and the note does not. The note must neither leave its table nor run
    // into the footer: no two pieces of text overlap, and the footer's two lines are the lowest on the page
    // [common practice: an explanatory note is not separated from the table it explains].
    const base = buildReportDocument();
    const sentence = 'Further invented history for the demonstration case, added only to move the table down the page. ';
    for (let n = 0; n <= 14; n++) {
      const doc = buildReportDocument({ case: { clinicalIndication: `${base.case.clinicalIndication} ${sentence.repeat(n)}`.trim() } });
      const bytes = await renderReportPdf(doc);
      const pdf = await readPdf(bytes);
      const pageOf = (text: string): number => pdf.pages.findIndex((p) => p.flat.includes(text));
      const lastRow = pageOf('Citrate synthase');
      expect(lastRow, `step ${n}`).toBeGreaterThanOrEqual(0);
      expect(pageOf('% of ref. mean: the result as a percentage of the mean'), `step ${n}`).toBe(lastRow);
      const page = pdf.pages[lastRow]!;
      const footer = page.lines.findIndex((l) => l.startsWith('Patient ID') && l.includes(' · Accession '));
      expect(page.lines.slice(footer + 1).map((l) => l.startsWith('Version ')), `step ${n}`).toEqual([true]);
      // layout.ts's stated contract: "Content never goes below this [PAGE.contentBottom]; the footer lives underneath."
      const lowest = Math.max(...page.baselines.slice(0, footer).map((y) => A4_HEIGHT - y));
      expect(lowest, `step ${n}: the lowest line above the footer`).toBeLessThanOrEqual(PAGE.contentBottom + 0.01);
      // Below the footer's rule (the lowest line across the text block) stand the footer's two lines and nothing else.
      const drawn = (await readDrawing(bytes))[lastRow]!;
      const rule = drawn.shapes
        .filter((x) => x.kind === 'stroke' && Math.abs(x.y1 - x.y2) < 0.01 && x.x2 - x.x1 > 500)
        .sort((a, b) => a.y1 - b.y1)[0]!;
      const below = new Set(drawn.texts.filter((t) => t.text.trim() !== '' && t.y < rule.y1).map((t) => t.y.toFixed(1)));
      expect(below.size, `step ${n}: lines under the footer rule`).toBe(2);
      const pieces = page.pieces.filter((p) => p.str.trim() !== '' && p.h > 0);
      for (let i = 0; i < pieces.length; i++) {
        for (let j = i + 1; j < pieces.length; j++) {
          const [a, b] = [pieces[i]!, pieces[j]!];
          const ox = Math.min(a.x + a.w, b.x + b.w) - Math.max(a.x, b.x);
          const oy = Math.min(a.y + 0.75 * a.h, b.y + 0.75 * b.h) - Math.max(a.y - 0.2 * a.h, b.y - 0.2 * b.h);
          expect(ox > 0.5 && oy > 0.5, `step ${n}: "${a.str}" over "${b.str}"`).toBe(false);
        }
      }
    }
  }, 300_000);
});
