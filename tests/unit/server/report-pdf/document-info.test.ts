import { beforeAll, describe, expect, it } from 'vitest';
import type { ReportDocument } from '@/schemas/report-document';
import {
  parseReportDocument,
  renderReportPdf,
  ReportDocumentError,
} from '../../../../server/domain/report-pdf/render-report-pdf';
import { buildCorrectedReportDocument, buildReportDocument } from '../../../factories/report-document';
import { openPdf } from '../../../factories/pdf-text';

/*
 * The document-level entries of the PDF, read back with pdfjs-dist (an independent reader), against the PDF
 * specification, ISO 32000-1:2008:
 * - §14.3.3, Table 317, the document information dictionary: Title, Author, Subject, Creator, Producer [confirmed];
 * - §14.9.2.1, the document's natural language, the catalog's /Lang [confirmed];
 * - §12.2, Table 150, viewer preferences: DisplayDocTitle true shows the Title, not the file name, in the window
 *   [confirmed]; PDF/UA-1 (ISO 14289-1 §7.1) asks for both [from memory].
 * What each entry says comes from the document rendered (its laboratory, accession and version) and from the rule
 * that a corrected report is marked as such wherever it is named (ISO 15189:2022 §7.4.1.7 [from memory]).
 */

interface Info {
  info: Record<string, unknown>;
  prefs: Record<string, unknown> | null;
  /** Each page's width and height in points, from its MediaBox (ISO 32000-1 §14.11.2). */
  pageSizes: [number, number][];
}

async function infoOf(bytes: Buffer): Promise<Info> {
  const pdf = await openPdf(bytes);
  const meta = await pdf.getMetadata();
  const prefs = (await pdf.getViewerPreferences()) as Record<string, unknown> | null;
  const pageSizes: [number, number][] = [];
  for (let n = 1; n <= pdf.numPages; n++) {
    const [x0, y0, x1, y1] = (await pdf.getPage(n)).view as [number, number, number, number];
    pageSizes.push([x1 - x0, y1 - y0]);
  }
  await pdf.destroy();
  return { info: meta.info as Record<string, unknown>, prefs, pageSizes };
}

describe('renderReportPdf: the document information a viewer and an index show', () => {
  let final: ReportDocument;
  let corrected: ReportDocument;
  let finalInfo: Info;
  let correctedInfo: Info;

  beforeAll(async () => {
    final = buildReportDocument();
    corrected = buildCorrectedReportDocument();
    finalInfo = await infoOf(await renderReportPdf(final));
    correctedInfo = await infoOf(await renderReportPdf(corrected));
  });

  it('when a final report is read back, then Title names the accession and version, Author the laboratory, Subject a final report', () => {
    const { info } = finalInfo;
    expect(info.Title).toMatch(new RegExp(`accession ${final.case.accession}, version ${final.report.version}$`));
    expect(info.Title).toMatch(/^Respiratory-chain enzyme report, /);
    expect(info.Author).toBe(final.laboratory.name);
    expect(info.Subject).toBe('Final report');
  });

  it('when a corrected report is read back, then its Subject says corrected and its Title carries the new version', () => {
    const { info } = correctedInfo;
    expect(info.Subject).toBe('Corrected report');
    expect(info.Title).toMatch(new RegExp(`, version ${corrected.report.version}$`));
    expect(corrected.report.version).not.toBe(final.report.version);
  });

  it('when read back, then the creating application is Cristae and the producer names Cristae too', () => {
    for (const { info } of [finalInfo, correctedInfo]) {
      expect(info.Creator).toBe('Cristae');
      expect(info.Producer).toMatch(/^Cristae\b/);
    }
  });

  it('when read back, then the language is English and viewers are asked to show the title (ISO 32000-1 §14.9.2, §12.2)', () => {
    for (const { info, prefs } of [finalInfo, correctedInfo]) {
      expect(info.Language).toBe('en');
      expect(prefs?.DisplayDocTitle).toBe(true);
    }
  });
});

describe('renderReportPdf: the paper size', () => {
  it('when read back, then every page is ISO 216 A4, 210 × 297 mm, portrait', async () => {
    // ISO 216: A4 is 210 mm × 297 mm. A PDF point is 1/72 inch (ISO 32000-1 §8.3.2.3) and an inch is 25.4 mm, so
    // A4 is 595.28 × 841.89 points (worked by hand: 210 / 25.4 × 72 = 595.2756, 297 / 25.4 × 72 = 841.8898).
    const { pageSizes } = await infoOf(await renderReportPdf(buildReportDocument()));
    expect(pageSizes.length).toBeGreaterThan(0);
    for (const [width, height] of pageSizes) {
      expect(width).toBeCloseTo(595.28, 1);
      expect(height).toBeCloseTo(841.89, 1);
    }
  });
});

describe('parseReportDocument: refusals', () => {
  it('when the input is not an object at all, then the one error names the document itself', () => {
    let caught: unknown;
    try {
      parseReportDocument(null);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(ReportDocumentError);
    const err = caught as ReportDocumentError;
    expect(err.name).toBe('ReportDocumentError');
    expect(err.fieldErrors).toHaveLength(1);
    expect(err.fieldErrors[0]!.path).toBe('(document)');
    expect(err.message).toBe(`Invalid report document: (document): ${err.fieldErrors[0]!.message}`);
  });

  it('when two fields are wrong, then the message lists both, each with its path, separated by a semicolon', () => {
    const doc = buildCorrectedReportDocument();
    const bad = {
      ...doc,
      report: { ...doc.report, supersedesVersion: null },
      signature: { ...doc.signature, signedAt: '2025-03-18 14:05' },
    };
    let caught: ReportDocumentError | undefined;
    try {
      parseReportDocument(bad);
    } catch (err) {
      caught = err as ReportDocumentError;
    }
    const paths = caught!.fieldErrors.map((e) => e.path).sort();
    expect(paths).toEqual(['report.supersedesVersion', 'signature.signedAt']);
    const parts = caught!.message.replace(/^Invalid report document: /, '').split('; ');
    expect(parts).toHaveLength(2);
    for (const e of caught!.fieldErrors) expect(parts).toContain(`${e.path}: ${e.message}`);
  });

  it('when the document is valid, then it comes back parsed', () => {
    const doc = buildReportDocument();
    expect(parseReportDocument(doc).case.accession).toBe(doc.case.accession);
  });
});
