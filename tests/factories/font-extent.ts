import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';

/**
 * How far the report's typeface (IBM Plex Sans, the @fontsource WOFF files the app ships) reaches above and below
 * its baseline, read with fontkit, the OpenType/WOFF parser pdfkit depends on (reached through pdfkit, not imported
 * by the app), so the layout's line boxes can be checked against the letters' real ink.
 */

interface Box {
  minY: number;
  maxY: number;
}
interface FontkitFont {
  unitsPerEm: number;
  bbox: Box;
  hasGlyphForCodePoint(cp: number): boolean;
  glyphForCodePoint(cp: number): { bbox: Box };
}

const requireFromPdfkit = createRequire(createRequire(import.meta.url).resolve('pdfkit'));
const fontkit = requireFromPdfkit('fontkit') as { create(buffer: Buffer): FontkitFont };
const requireHere = createRequire(import.meta.url);

function latinFace(weight: 400 | 600): FontkitFont {
  return fontkit.create(readFileSync(requireHere.resolve(`@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-${weight}-normal.woff`)));
}

/** Extent in em, positive up from the baseline. */
export interface InkExtent {
  /** Highest ink and the character that reaches it. */
  top: number;
  topChar: string;
  /** Lowest ink (negative: below the baseline) and its character. */
  bottom: number;
  bottomChar: string;
}

/**
 * The highest and lowest ink of the printable ISO 8859-1 (Latin-1) characters, U+0021–U+007E and U+00A1–U+00FF,
 * the letters of Western European names and words.
 */
export function latin1InkExtent(weight: 400 | 600): InkExtent {
  const font = latinFace(weight);
  const extent: InkExtent = { top: -Infinity, topChar: '', bottom: Infinity, bottomChar: '' };
  for (let cp = 0x21; cp <= 0xff; cp++) {
    if ((cp > 0x7e && cp < 0xa1) || !font.hasGlyphForCodePoint(cp)) continue;
    const { minY, maxY } = font.glyphForCodePoint(cp).bbox;
    const ch = String.fromCodePoint(cp);
    if (maxY / font.unitsPerEm > extent.top) Object.assign(extent, { top: maxY / font.unitsPerEm, topChar: ch });
    if (minY / font.unitsPerEm < extent.bottom) Object.assign(extent, { bottom: minY / font.unitsPerEm, bottomChar: ch });
  }
  return extent;
}

/** The lowest point any glyph of the face reaches, in em (the 'head' table's yMin over unitsPerEm; negative). */
export function faceBottom(weight: 400 | 600): number {
  const font = latinFace(weight);
  return font.bbox.minY / font.unitsPerEm;
}
