import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { inflateSync } from 'node:zlib';
import { create as openFont, type Font } from 'fontkit';

/**
 * IBM Plex Sans from @fontsource, shipped with the app. pdfkit embeds one font file per face and
 * does no fallback of its own, and the @fontsource files are split by script (the latin file has µ,
 * ¹, ±, – but no ε and no superscript minus; the greek file has ε but no digits). So each weight
 * is a chain of files, and text.ts picks, character by character, the first file whose cmap has the
 * glyph. Only .woff files: pdfkit renders the .woff2 subsets' glyphs blank.
 */

export type Weight = 400 | 600;

const SUBSETS = ['latin', 'latin-ext', 'greek', 'cyrillic', 'cyrillic-ext', 'vietnamese'] as const;
type Subset = (typeof SUBSETS)[number];

export interface FontFace {
  /** Name registered with pdfkit. */
  key: string;
  weight: Weight;
  subset: Subset;
  /** The unwrapped OpenType font. */
  data: Buffer;
  /**
   * The font parsed once per process and handed to every document (pdfkit accepts a fontkit font as well as
   * bytes), so a report no longer parses the faces again and fontkit's glyph and layout caches stay warm.
   * Each document still makes its own subset of the glyphs it uses.
   */
  font: Font;
  covers: (codePoint: number) => boolean;
}

const require = createRequire(import.meta.url);

function fontPath(subset: Subset, weight: Weight): string {
  return require.resolve(`@fontsource/ibm-plex-sans/files/ibm-plex-sans-${subset}-${weight}-normal.woff`);
}

/**
 * Unwraps a WOFF 1.0 file into the plain OpenType (sfnt) font it carries (W3C WOFF File Format 1.0,
 * section 5). pdfkit's fontkit would otherwise inflate every table in pure JavaScript each time a
 * document first uses the face, which was most of the render time; node:zlib does it once here.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.toString('latin1', 0, 4) !== 'wOFF') throw new Error('Not a WOFF 1.0 font file');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables: Array<{ tag: string; checksum: number; data: Buffer }> = [];
  for (let i = 0; i < numTables; i++) {
    const entry = 44 + i * 20;
    const tag = woff.toString('latin1', entry, entry + 4);
    const offset = woff.readUInt32BE(entry + 4);
    const compLength = woff.readUInt32BE(entry + 8);
    const origLength = woff.readUInt32BE(entry + 12);
    const checksum = woff.readUInt32BE(entry + 16);
    const raw = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(raw) : Buffer.from(raw);
    if (data.length !== origLength) throw new Error(`WOFF table ${tag} has the wrong length after inflating`);
    tables.push({ tag, checksum, data });
  }
  // Directory entries sorted by tag, as the OpenType spec asks.
  tables.sort((a, b) => (a.tag < b.tag ? -1 : a.tag > b.tag ? 1 : 0));
  const pow2 = 2 ** Math.floor(Math.log2(numTables));
  const headerLength = 12 + numTables * 16;
  const padded = (n: number): number => (n + 3) & ~3;
  const total = tables.reduce((sum, t) => sum + padded(t.data.length), headerLength);
  const out = Buffer.alloc(total);
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(pow2 * 16, 6);
  out.writeUInt16BE(Math.log2(pow2), 8);
  out.writeUInt16BE(numTables * 16 - pow2 * 16, 10);
  let offset = headerLength;
  tables.forEach((t, i) => {
    const entry = 12 + i * 16;
    out.write(t.tag, entry, 'latin1');
    out.writeUInt32BE(t.checksum, entry + 4);
    out.writeUInt32BE(offset, entry + 8);
    out.writeUInt32BE(t.data.length, entry + 12);
    t.data.copy(out, offset);
    offset += padded(t.data.length);
  });
  return out;
}

/** Code points the font's Unicode cmap maps to a real glyph (OpenType 'cmap' formats 4 and 12). */
export function readCoverage(sfnt: Buffer): Set<number> {
  const numTables = sfnt.readUInt16BE(4);
  let cmap: Buffer | null = null;
  for (let i = 0; i < numTables; i++) {
    const entry = 12 + i * 16;
    if (sfnt.toString('latin1', entry, entry + 4) !== 'cmap') continue;
    const offset = sfnt.readUInt32BE(entry + 8);
    cmap = sfnt.subarray(offset, offset + sfnt.readUInt32BE(entry + 12));
  }
  if (!cmap) throw new Error('Font has no cmap table');
  const table = cmap;
  const covered = new Set<number>();
  const numSubtables = table.readUInt16BE(2);
  let best: { offset: number; format: number } | null = null;
  for (let i = 0; i < numSubtables; i++) {
    const rec = 4 + i * 8;
    const platform = table.readUInt16BE(rec);
    const encoding = table.readUInt16BE(rec + 2);
    const offset = table.readUInt32BE(rec + 4);
    const format = table.readUInt16BE(offset);
    const unicode = platform === 0 || (platform === 3 && (encoding === 1 || encoding === 10));
    if (!unicode || (format !== 4 && format !== 12)) continue;
    if (!best || (format === 12 && best.format === 4)) best = { offset, format };
  }
  if (!best) throw new Error('Font has no Unicode cmap subtable');
  const o = best.offset;
  if (best.format === 12) {
    const groups = table.readUInt32BE(o + 12);
    for (let g = 0; g < groups; g++) {
      const start = table.readUInt32BE(o + 16 + g * 12);
      const end = table.readUInt32BE(o + 20 + g * 12);
      const glyph = table.readUInt32BE(o + 24 + g * 12);
      for (let c = start; c <= end; c++) if (glyph + (c - start) !== 0) covered.add(c);
    }
    return covered;
  }
  const segX2 = table.readUInt16BE(o + 6);
  const ends = o + 14;
  const starts = ends + segX2 + 2;
  const deltas = starts + segX2;
  const rangeOffsets = deltas + segX2;
  for (let s = 0; s < segX2 / 2; s++) {
    const end = table.readUInt16BE(ends + s * 2);
    const start = table.readUInt16BE(starts + s * 2);
    const delta = table.readInt16BE(deltas + s * 2);
    const rangeOffset = table.readUInt16BE(rangeOffsets + s * 2);
    for (let c = start; c <= end && c !== 0xffff; c++) {
      let glyph: number;
      if (rangeOffset === 0) {
        glyph = (c + delta) & 0xffff;
      } else {
        const at = rangeOffsets + s * 2 + rangeOffset + (c - start) * 2;
        glyph = table.readUInt16BE(at);
        if (glyph !== 0) glyph = (glyph + delta) & 0xffff;
      }
      if (glyph !== 0) covered.add(c);
    }
  }
  return covered;
}

let cache: Record<Weight, FontFace[]> | null = null;

/** The fallback chain for each weight, latin first. Loaded once per process. */
export function fontChains(): Record<Weight, FontFace[]> {
  if (cache) return cache;
  const load = (weight: Weight): FontFace[] =>
    SUBSETS.map((subset) => {
      const data = woffToSfnt(readFileSync(fontPath(subset, weight)));
      const coverage = readCoverage(data);
      return {
        key: `plex-${subset}-${weight}`,
        weight,
        subset,
        data,
        font: openFont(data),
        covers: (cp: number) => coverage.has(cp),
      };
    });
  cache = { 400: load(400), 600: load(600) };
  return cache;
}

/** The first face of the chain that has a glyph for the code point, or null. */
export function faceFor(weight: Weight, codePoint: number): FontFace | null {
  for (const face of fontChains()[weight]) if (face.covers(codePoint)) return face;
  return null;
}
