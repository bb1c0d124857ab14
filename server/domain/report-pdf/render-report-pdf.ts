import PDFDocument from 'pdfkit';
import { reportDocumentSchema, type ReportDocument } from '@/schemas/report-document';
import { drawBarGraphic } from './bar-graphic';
import { Composer } from './layout';
import {
  REPORT_TITLE,
  drawCaution,
  drawChangedValues,
  drawCorrectionNotice,
  drawFirstPageHeader,
  drawFooter,
  drawIdentification,
  drawMethods,
  drawPatternAndInterpretation,
  drawRejectionNotice,
  drawResults,
  drawRunningHeader,
  drawSignature,
  drawSpecimenSection,
} from './sections';
import { registerFonts } from './text';

/** Thrown when the document does not match the schema; each issue names its field path. */
export class ReportDocumentError extends Error {
  constructor(readonly fieldErrors: Array<{ path: string; message: string }>) {
    super(`Invalid report document: ${fieldErrors.map((e) => `${e.path}: ${e.message}`).join('; ')}`);
    this.name = 'ReportDocumentError';
  }
}

export function parseReportDocument(input: unknown): ReportDocument {
  const parsed = reportDocumentSchema.safeParse(input);
  if (parsed.success) return parsed.data;
  throw new ReportDocumentError(
    parsed.error.issues.map((issue) => ({
      path: issue.path.length > 0 ? issue.path.map(String).join('.') : '(document)',
      message: issue.message,
    })),
  );
}

/**
 * Renders the signed report to PDF bytes. Pure: no clock, no randomness, no I/O beyond reading the
 * bundled font files, so the same document always gives the same bytes.
 *
 * Determinism: pdfkit 0.20 writes the trailer /ID as the MD5 of the Info dictionary (which holds
 * CreationDate), not random bytes, unless the file is encrypted (it is not). We set CreationDate
 * and ModDate to the signing time, so the ID and every other byte depend only on the document.
 * Font subset tags are derived from pdfkit's font counter, also deterministic.
 */
export async function renderReportPdf(input: ReportDocument): Promise<Buffer> {
  const doc = parseReportDocument(input);
  const signedAt = new Date(doc.signature.signedAt);
  const pdf = new PDFDocument({
    size: 'A4',
    margin: 0,
    autoFirstPage: false,
    bufferPages: true,
    lang: 'en',
    displayTitle: true,
    info: {
      // No patient name here: viewers show these fields and indexes copy them.
      Title: `${REPORT_TITLE}, accession ${doc.case.accession}, version ${doc.report.version}`,
      Author: doc.laboratory.name,
      Subject: doc.report.status === 'corrected' ? 'Corrected report' : 'Final report',
      Creator: 'Cristae',
      Producer: 'Cristae (PDFKit)',
      CreationDate: signedAt,
      ModDate: signedAt,
    },
  });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    pdf.on('data', (chunk: Buffer) => chunks.push(chunk));
    pdf.on('end', () => resolve(Buffer.concat(chunks)));
    pdf.on('error', reject);
  });

  registerFonts(pdf);
  pdf.addPage({ size: 'A4', margin: 0 });
  const c = new Composer(pdf, (composer) => drawRunningHeader(composer, doc), 0);
  drawFirstPageHeader(c, doc);
  drawCorrectionNotice(c, doc);
  drawChangedValues(c, doc);
  const [first, ...rest] = doc.specimens;
  if (first && rest.length === 0) {
    // One specimen: the compact layout, results straight under the identification block.
    drawRejectionNotice(c, first.specimen);
    drawIdentification(c, doc);
    drawResults(c, first);
    if (first.specimen.accepted) drawBarGraphic(c, first.graphic);
  } else {
    // Several: every specimen gets its own section, rejected ones included (CLIA 493.1291(c)(5)-(7)).
    drawIdentification(c, doc);
    doc.specimens.forEach((section, i) => drawSpecimenSection(c, section, i));
  }
  drawPatternAndInterpretation(c, doc);
  drawMethods(c, doc);
  drawSignature(c, doc);
  drawCaution(c);

  const range = pdf.bufferedPageRange();
  for (let i = 0; i < range.count; i++) {
    pdf.switchToPage(range.start + i);
    drawFooter(c, doc, i + 1, range.count);
  }
  pdf.end();
  return done;
}
