import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/**
 * Reads a rendered report back with pdfjs-dist, an independent PDF reader: text lines per page, the
 * page's text flattened, and each text piece with its position (for table columns).
 */

export interface PdfPage {
  /** Text lines, top to bottom; pieces on one baseline joined, a space where there is a gap. */
  lines: string[];
  /** All text of the page with whitespace collapsed, for phrases that may wrap. */
  flat: string;
  /** Baselines (PDF units from the page bottom) of lines, same order as `lines`. */
  baselines: number[];
  pieces: Piece[];
}

export interface Piece {
  str: string;
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface ReadPdf {
  pages: PdfPage[];
  flat: string;
  info: Record<string, unknown>;
}

export const collapse = (s: string): string => s.replace(/\s+/g, ' ').trim();

/** A PDF opened with pdfjs for reading back (no eval, no console noise); every read-back in the tests starts here. */
export const openPdf = (bytes: Buffer) => getDocument({ data: new Uint8Array(bytes), isEvalSupported: false, verbosity: 0 }).promise;

export async function readPdf(bytes: Buffer): Promise<ReadPdf> {
  const pdf = await openPdf(bytes);
  const pages: PdfPage[] = [];
  for (let n = 1; n <= pdf.numPages; n++) {
    const page = await pdf.getPage(n);
    const content = await page.getTextContent();
    const pieces: Piece[] = [];
    for (const item of content.items) {
      if (!('str' in item) || item.str.length === 0) continue;
      const [, , , , x, y] = item.transform as number[];
      pieces.push({ str: item.str, x: x ?? 0, y: y ?? 0, w: item.width, h: item.height });
    }
    // Pieces on the same baseline form a line. A smaller piece a little above a line (a raised
    // superscript) belongs to that line; larger pieces go first so their lines exist by then.
    pieces.sort((a, b) => b.h - a.h || b.y - a.y || a.x - b.x);
    const rows: Array<{ y: number; h: number; items: typeof pieces }> = [];
    for (const p of pieces) {
      const row =
        rows.find((r) => Math.abs(r.y - p.y) < 0.5) ??
        rows.find((r) => p.h < 0.8 * r.h && p.y - r.y > 0 && p.y - r.y < 0.5 * r.h);
      if (row) row.items.push(p);
      else rows.push({ y: p.y, h: p.h, items: [p] });
    }
    rows.sort((a, b) => b.y - a.y);
    const lines = rows.map((r) => {
      const items = [...r.items].sort((a, b) => a.x - b.x);
      let text = '';
      let end = -Infinity;
      for (const it of items) {
        text += (text && it.x - end > 1.5 ? ' ' : '') + it.str;
        end = it.x + it.w;
      }
      return text;
    });
    pages.push({ lines, flat: collapse(lines.join(' ')), baselines: rows.map((r) => r.y), pieces });
  }
  const meta = await pdf.getMetadata();
  await pdf.destroy();
  return { pages, flat: collapse(pages.map((p) => p.flat).join(' ')), info: meta.info as Record<string, unknown> };
}

/** Text of one table column, top to bottom: pieces starting between the x of two header labels. */
export function columnText(page: PdfPage, fromHeader: string, toHeader?: string): string {
  const xOf = (label: string): number => {
    const piece = page.pieces.find((p) => p.str.trim() === label);
    if (!piece) throw new Error(`No header piece '${label}' on the page`);
    return piece.x;
  };
  const from = xOf(fromHeader) - 1;
  const to = toHeader === undefined ? Infinity : xOf(toHeader) - 1;
  const inColumn = page.pieces.filter((p) => p.x >= from && p.x < to).sort((a, b) => b.y - a.y || a.x - b.x);
  let text = '';
  let prev: Piece | null = null;
  for (const p of inColumn) {
    const touching = prev !== null && Math.abs(prev.y - p.y) < 0.5 && p.x - (prev.x + prev.w) <= 1.5;
    text += (text && !touching ? ' ' : '') + p.str;
    prev = p;
  }
  return collapse(text);
}

