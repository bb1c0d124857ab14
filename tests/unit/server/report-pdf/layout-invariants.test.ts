import { beforeAll, describe, expect, it } from 'vitest';
import type { ReportDocument } from '@/schemas/report-document';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import {
  buildCorrectedReportDocument,
  buildRejectedReportDocument,
  buildReportDocument,
  buildTwoSpecimenReportDocument,
} from '../../../factories/report-document';
import { readPdf, type Piece, type ReadPdf } from '../../../factories/pdf-text';

/*
 * Properties of the printed page that any correct layout has, read back with pdfjs-dist (an independent PDF
 * reader) and never with a coordinate taken from the layout code:
 * - no two pieces of text print over each other (a reader must be able to read every word) [common practice];
 * - every piece lies on the A4 sheet (ISO 216: 210 × 297 mm = 595.28 × 841.89 pt [confirmed]) at least 5 mm from
 *   each edge, the unprintable border of common office printers [common practice];
 * - the report reads top to bottom in the order its sections are written: identification, results, pattern,
 *   interpretation, methods, signature, caution, a correction or rejection notice above the identification
 *   (docs/domain.md §5 lists the content; the order is Cristae's,
 *   the check is that the page shows it in that order) [derived];
 * - a page's content stays above its footer, and the footer is the last thing on each page.
 */

const A4 = { width: 595.28, height: 841.89 };
const EDGE = (5 / 25.4) * 72; // 5 mm in points

/** The vertical extent of a piece of text: a little below its baseline (descenders) to near its top. */
const box = (p: Piece) => ({ x1: p.x, x2: p.x + p.w, y1: p.y - 0.2 * p.h, y2: p.y + 0.75 * p.h });

function overlaps(pdf: ReadPdf): string[] {
  const found: string[] = [];
  pdf.pages.forEach((page, n) => {
    const pieces = page.pieces.filter((p) => p.str.trim() !== '' && p.h > 0);
    for (let i = 0; i < pieces.length; i++) {
      for (let j = i + 1; j < pieces.length; j++) {
        const a = box(pieces[i]!);
        const b = box(pieces[j]!);
        const ox = Math.min(a.x2, b.x2) - Math.max(a.x1, b.x1);
        const oy = Math.min(a.y2, b.y2) - Math.max(a.y1, b.y1);
        if (ox > 0.5 && oy > 0.5) found.push(`page ${n + 1}: "${pieces[i]!.str}" over "${pieces[j]!.str}"`);
      }
    }
  });
  return found;
}

function offSheet(pdf: ReadPdf): string[] {
  const found: string[] = [];
  pdf.pages.forEach((page, n) => {
    for (const p of page.pieces) {
      if (p.str.trim() === '') continue;
      const b = box(p);
      if (b.x1 < EDGE || b.x2 > A4.width - EDGE || b.y1 < EDGE || b.y2 > A4.height - EDGE) found.push(`page ${n + 1}: "${p.str}"`);
    }
  });
  return found;
}

/** Where the first line containing `text` stands, as (page, position from the top) for ordering. */
function place(pdf: ReadPdf, text: string): number {
  for (const [n, page] of pdf.pages.entries()) {
    const i = page.lines.findIndex((l) => l.includes(text));
    if (i >= 0) return n * 10_000 + (A4.height - page.baselines[i]!);
  }
  throw new Error(`"${text}" is not printed`);
}

function footerIsLast(pdf: ReadPdf): string[] {
  const found: string[] = [];
  pdf.pages.forEach((page, n) => {
    const footer = page.lines.findIndex((l) => l.startsWith('Patient ID') && l.includes(' · Accession '));
    if (footer < 0) {
      found.push(`page ${n + 1}: no footer`);
      return;
    }
    // The footer's two lines are the lowest on the page: "Patient ID …" then "Version … Page x of y".
    const below = page.lines.slice(footer + 1);
    if (below.length !== 1 || !below[0]!.startsWith('Version ')) found.push(`page ${n + 1}: ${JSON.stringify(below)}`);
  });
  return found;
}

const documents: Array<[string, () => ReportDocument, string[]]> = [
  [
    'a final report of one specimen',
    () => buildReportDocument({ laboratory: { phone: '+00 0000 000000 (demo)' }, patient: { ageAtCollection: '8 years' } }),
    ['Respiratory-chain enzyme report', 'Clinical indication', 'Reference interval', 'Pattern summary', 'Interpretation', 'Methods and traceability', 'Electronic signature', 'Caution.'],
  ],
  [
    'a corrected report',
    () => {
      const corrected = buildCorrectedReportDocument();
      const changedValues = [{ specimen: null, item: 'CIV activity', before: '58.2 nmol/min/mg protein', after: '85.2 nmol/min/mg protein' }];
      return buildCorrectedReportDocument({ report: { ...corrected.report, changedValues } });
    },
    ['Respiratory-chain enzyme report', 'CORRECTED REPORT', 'Values changed since version 1', 'Clinical indication', 'Reference interval', 'Interpretation', 'Electronic signature', 'Caution.'],
  ],
  [
    'a rejected specimen',
    buildRejectedReportDocument,
    ['Respiratory-chain enzyme report', 'SPECIMEN REJECTED', 'Clinical indication', 'Not performed.', 'Interpretation', 'Methods and traceability', 'Electronic signature', 'Caution.'],
  ],
  [
    'two specimens',
    buildTwoSpecimenReportDocument,
    ['Respiratory-chain enzyme report', 'Clinical indication', 'Specimen A \u2014 Skeletal muscle', 'Specimen B \u2014 Liver', 'Interpretation', 'Methods and traceability', 'Electronic signature', 'Caution.'],
  ],
];

describe.each(documents)('the printed page of %s', (_, build, order) => {
  let pdf: ReadPdf;
  beforeAll(async () => {
    pdf = await readPdf(await renderReportPdf(build()));
  }, 120_000);

  it('when read back, then no two pieces of text print over each other [common practice]', () => {
    expect(overlaps(pdf)).toEqual([]);
  });

  it('when read back, then every piece of text lies on the A4 sheet at least 5 mm from its edges (ISO 216 [confirmed])', () => {
    expect(offSheet(pdf)).toEqual([]);
  });

  it('when read back, then the sections read top to bottom in their written order [derived]', () => {
    const places = order.map((text) => place(pdf, text));
    expect(places).toEqual([...places].sort((a, b) => a - b));
  });

  it('when read back, then each page ends with its two footer lines and nothing below them', () => {
    expect(footerIsLast(pdf)).toEqual([]);
  });
});
