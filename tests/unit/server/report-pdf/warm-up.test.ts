import PDFDocument from 'pdfkit';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { STYLES } from '../../../../server/domain/report-pdf/layout';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import { BAND_WORDS, MEASURE_PHRASES, REPORT_TITLE, STATUS_WORDS } from '../../../../server/domain/report-pdf/sections';
import { registerFonts, textWidth } from '../../../../server/domain/report-pdf/text';
import { warmUpReportRendering } from '../../../../server/domain/report-pdf/warm-up';
import { buildTwoSpecimenReportDocument } from '../../../factories/report-document';
import { readPdf, type ReadPdf } from '../../../factories/pdf-text';

/*
 * What the start-up warm-up (server/index.ts calls it once the server listens) promises in its own comment: it lays
 * out and draws report text in every report style into a throw-away PDF, so the first real report finds the faces
 * parsed and the common widths measured, and it yields to the event loop between pieces so the server keeps
 * answering. The throw-away PDF is caught here (pdfkit's document class is extended to keep its bytes) and read
 * back with pdfjs-dist, an independent PDF reader; the real report it is compared with is rendered from the
 * two-specimen factory document. No expectation is taken from warm-up.ts's own sample list.
 */

const caught = vi.hoisted(() => ({ pdfs: [] as Array<Promise<Buffer>> }));

vi.mock('pdfkit', async (importOriginal) => {
  const actual = await importOriginal<{ default: new (...args: unknown[]) => NodeJS.EventEmitter }>();
  // Keeps each chunk as the document pushes it, without a 'data' listener of its own (which would make the stream
  // flow whether or not the warm-up reads it), and hands the bytes over when the document ends.
  // (The chunks live in a WeakMap: the document pushes its header from its constructor, before class fields exist.)
  const kept = new WeakMap<object, Buffer[]>();
  class KeepingBytes extends actual.default {
    constructor(...args: unknown[]) {
      super(...args);
      caught.pdfs.push(new Promise((resolve) => this.on('end', () => resolve(Buffer.concat(kept.get(this) ?? [])))));
    }
    push(chunk: Buffer | null): boolean {
      if (chunk) kept.set(this, [...(kept.get(this) ?? []), Buffer.from(chunk)]);
      return (actual.default.prototype as unknown as { push(c: Buffer | null): boolean }).push.call(this, chunk);
    }
  }
  return { default: KeepingBytes };
});

/** ISO 216 A4 in points [confirmed] and a 5 mm border no office printer prints [common practice]. */
const A4 = { width: 595.28, height: 841.89 };
const EDGE = (5 / 25.4) * 72;

/** pdfjs gives the micro sign as Greek mu (as in render-report-pdf.test.ts). */
const asExtracted = (s: string): string => s.replace(/µ/g, 'μ');

const words = (s: string): string[] => s.split(/\s+/).filter(Boolean);

let warm: ReadPdf | undefined;
let documentsMade = 0;
let report: ReadPdf;
let turnsDuringWarmUp = 0;
const measuredAfter: Array<{ word: string; size: number; calls: number }> = [];
let controlCalls = 0;

beforeAll(async () => {
  const measure = vi.spyOn(PDFDocument.prototype, 'widthOfString');

  // A competing task that takes a turn of the event loop whenever the warm-up lets it (a request would too).
  let running = true;
  const tick = (): void => {
    if (!running) return;
    turnsDuringWarmUp += 1;
    setImmediate(tick);
  };
  setImmediate(tick);
  const before = caught.pdfs.length;
  await warmUpReportRendering();
  running = false;
  // Checked in the tests, not here: a hook that throws leaves every test skipped, which Stryker counts as survived.
  documentsMade = caught.pdfs.length - before;
  if (documentsMade === 1) warm = await readPdf(await caught.pdfs[before]!);

  // After the warm-up, measure the report's fixed words, word by word as the layout does, on a new document.
  measure.mockClear();
  const doc = new PDFDocument({ autoFirstPage: false });
  registerFonts(doc);
  const fixed = [REPORT_TITLE, ...Object.values(STATUS_WORDS), ...Object.values(BAND_WORDS), ...Object.values(MEASURE_PHRASES)];
  for (const style of Object.values(STYLES)) {
    for (const word of fixed.flatMap(words)) {
      const callsBefore = measure.mock.calls.length;
      textWidth(doc, word, style);
      measuredAfter.push({ word, size: style.size, calls: measure.mock.calls.length - callsBefore });
    }
  }
  // A word no report vocabulary holds (the fictitious laboratory's name): it must cost a measurement, which shows
  // that the spy sees pdfkit's measuring at all.
  const callsBefore = measure.mock.calls.length;
  textWidth(doc, 'Fernhollowvale', STYLES.body);
  controlCalls = measure.mock.calls.length - callsBefore;
  measure.mockRestore();

  report = await readPdf(await renderReportPdf(buildTwoSpecimenReportDocument()));
}, 300_000);

describe('warmUpReportRendering', () => {
  it('when it has run, then it made one throw-away document, a finished PDF of one A4 page that a PDF reader opens', () => {
    expect(documentsMade).toBe(1);
    expect(warm?.pages).toHaveLength(1);
    expect(warm!.pages[0]!.pieces.length).toBeGreaterThan(0);
  });

  it('when it draws, then every piece of text lies on the A4 sheet at least 5 mm from each edge', () => {
    const off = warm!.pages[0]!.pieces.filter(
      (p) =>
        p.str.trim() !== '' &&
        (p.x < EDGE || p.x + p.w > A4.width - EDGE || p.y - 0.2 * p.h < EDGE || p.y + 0.75 * p.h > A4.height - EDGE),
    );
    expect(off.map((p) => `${p.str} at (${p.x.toFixed(1)}, ${p.y.toFixed(1)})`)).toEqual([]);
  });

  it('when it draws, then text appears in the size of every report style', () => {
    const sizes = new Set(warm!.pages[0]!.pieces.map((p) => p.h.toFixed(2)));
    for (const [name, style] of Object.entries(STYLES)) expect(sizes.has(style.size.toFixed(2)), name).toBe(true);
  });

  it('when a report is printed, then every character it prints was drawn by the warm-up (glyphs loaded from every face)', () => {
    const reportChars = new Set([...asExtracted(report.flat)].filter((ch) => ch.trim() !== ''));
    const warmChars = new Set([...warm!.flat]);
    // Sanity: the report holds characters from more than one face of the chain (ε from the greek file) [fonts.ts].
    expect(reportChars.has('ε')).toBe(true);
    expect([...reportChars].filter((ch) => !warmChars.has(ch))).toEqual([]);
  });

  it('when a report is printed, then the words it uses for complexes, units, specimens and sign-off were laid out by the warm-up', () => {
    // Words of the report's own vocabulary (docs/domain.md: the complexes and citrate synthase, the unit of
    // activity, specimen types, the parts of the report), each checked first in the real report [derived].
    const vocabulary = [
      'NADH', 'ubiquinone', 'cytochrome', 'oxidase', 'succinate', 'citrate', 'synthase',
      'nmol/min/mg', 'protein', 'mM',
      'Specimen', 'muscle', 'liver', 'Accession',
      'Interpretation', 'Reference', 'interval', 'signature', 'Laboratory', 'Director',
    ];
    const inReport = report.flat.toLowerCase();
    const inWarm = new Set(words(warm!.flat.toLowerCase()));
    for (const w of vocabulary) {
      expect(inReport.includes(w.toLowerCase()), `report prints ${w}`).toBe(true);
      expect(inWarm.has(w.toLowerCase()) || [...inWarm].some((x) => x.startsWith(w.toLowerCase())), `warm-up draws ${w}`).toBe(true);
    }
  });

  it("when it has run, then the report's fixed words are measured from the kept widths in every style, without asking pdfkit again", () => {
    expect(controlCalls).toBeGreaterThan(0);
    expect(measuredAfter.length).toBeGreaterThan(0);
    expect(measuredAfter.filter((m) => m.calls > 0)).toEqual([]);
  });

  it('when it runs, then other work gets turns of the event loop in between (at least one per report style)', () => {
    expect(turnsDuringWarmUp).toBeGreaterThanOrEqual(Object.keys(STYLES).length);
  });
});
