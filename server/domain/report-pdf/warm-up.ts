import PDFDocument from 'pdfkit';
import { COLORS, CONTENT_WIDTH, PAGE, STYLES } from './layout';
import { BAND_WORDS, MEASURE_PHRASES, REPORT_TITLE, STATUS_WORDS } from './sections';
import { drawLine, registerFonts, wrapText } from './text';

/** Text of the kind every report prints: words, digits, units and the symbols that need the fallback faces. */
const SAMPLES = [
  REPORT_TITLE,
  ...Object.values(MEASURE_PHRASES),
  ...Object.values(STATUS_WORDS),
  ...Object.values(BAND_WORDS),
  'Complex I II III IV CI+III CII+III citrate synthase CS NADH ubiquinone cytochrome c oxidase succinate',
  'Activity nmol/min/mg protein 0.123 45.6 789 12.5 ± 3.4 – 10% µL µg ε mM⁻¹·cm⁻¹ n = 20 (2.5–97.5) at 30 °C',
  'Specimen A — skeletal muscle liver fibroblasts received collected accession CR-2026-00001 version 1 page 1 of 2',
  'Pattern interpretation method reference interval signed signature approved corrected laboratory’s director technologist',
  'ABCDEFGHIJKLMNOPQRSTUVWXYZ abcdefghijklmnopqrstuvwxyz 0123456789 .,;:!?()[]/-+=*%&\'"',
];

const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Lays out and draws sample report text in every report style and writes the throw-away PDF, so the first real
 * report after a start finds the faces parsed, the common widths measured and fontkit's and pdfkit's code
 * compiled. Yields to the event loop between pieces of text (each a few milliseconds) so the server keeps
 * answering while it runs.
 */
export async function warmUpReportRendering(): Promise<void> {
  const doc = new PDFDocument({ size: 'A4', margin: 0, autoFirstPage: false, bufferPages: true });
  const done = new Promise<void>((resolve, reject) => {
    doc.on('data', () => undefined);
    doc.on('end', () => resolve());
    doc.on('error', reject);
  });
  registerFonts(doc);
  doc.addPage({ size: 'A4', margin: 0 });
  let y: number = PAGE.contentTop;
  for (const style of Object.values(STYLES)) {
    for (const sample of SAMPLES) {
      await nextTurn();
      for (const line of wrapText(doc, sample, style, CONTENT_WIDTH)) {
        y = y > PAGE.contentBottom ? PAGE.contentTop : y + style.size * 1.4;
        drawLine(doc, line, PAGE.marginX, y);
      }
    }
  }
  doc.rect(PAGE.marginX, PAGE.contentTop, 10, 10).fill(COLORS.band);
  await nextTurn();
  doc.end();
  await done;
}
