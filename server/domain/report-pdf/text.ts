import type PDFDocument from 'pdfkit';
import { faceFor, fontChains, type Weight } from './fonts';

/**
 * A small text engine on top of pdfkit: font fallback per character, synthetic super/subscripts
 * for the few that no Plex file has (⁻, ₀…), and our own line wrapping, so that every height is
 * known before drawing and page breaks fall where the layout decides, never inside pdfkit.
 */

type Doc = InstanceType<typeof PDFDocument>;

export interface TextStyle {
  weight: Weight;
  size: number;
  color: string;
}

export interface Segment {
  text: string;
  style: TextStyle;
}

/** A stretch drawn with one pdfkit call. `rise` is in points, positive upwards. */
export interface Run {
  text: string;
  face: string;
  size: number;
  rise: number;
  color: string;
}

export interface Line {
  runs: Run[];
  width: number;
}

/** Plain replacements for characters no embedded face has (checked against the cmaps). */
const REPLACEMENTS: Record<string, string> = {
  '≥': '>=',
  '≤': '<=',
  '→': '->',
  '←': '<-',
  '✓': 'yes',
  '✗': 'no',
  '\u00a0': ' ',
  '\t': ' ',
};

const SCRIPT_SCALE = 0.68;

/*
 * pdfkit shapes every space-separated piece of text with fontkit and keeps the result in a cache on its font
 * object, which is made anew for each document. The faces are shared by every document (fonts.ts) and a shaped
 * piece depends only on the face and the text, so each face gets one cache for the whole process (emptied past
 * LAYOUT_CACHE_MAX pieces): a report re-uses what earlier reports and the start-up warm-up shaped. The glyph
 * runs in it are only read after shaping (pdfkit copies them into each document's subset).
 */
const LAYOUT_CACHE_MAX = 20_000;
const layoutCaches = new Map<string, Record<string, unknown>>();

/** Selects the face on the document and hands its pdfkit font the process-wide layout cache. */
function useFace(doc: Doc, key: string): Doc {
  doc.font(key);
  const font = (doc as unknown as { _font: { layoutCache?: Record<string, unknown> } })._font;
  let cache = layoutCaches.get(key);
  if (!cache) layoutCaches.set(key, (cache = Object.create(null) as Record<string, unknown>));
  if (font.layoutCache !== cache) font.layoutCache = cache;
  return doc;
}

/** Registers every face of both chains; pdfkit embeds only the faces that end up used. */
export function registerFonts(doc: Doc): void {
  const chains = fontChains();
  for (const face of [...chains[400], ...chains[600]]) doc.registerFont(face.key, face.font as never);
  for (const [key, cache] of layoutCaches) if (Object.keys(cache).length > LAYOUT_CACHE_MAX) layoutCaches.delete(key);
}

function scriptShift(cp: number): 'sup' | 'sub' | null {
  if (cp >= 0x2070 && cp <= 0x207f) return 'sup';
  if (cp >= 0x2080 && cp <= 0x209c) return 'sub';
  return null;
}

/**
 * Splits text into runs by the face that can draw each character. A character with no glyph in any
 * face is replaced (super/subscripts by a smaller raised/lowered character, a few symbols by plain
 * text, anything else by '?'), so nothing is ever drawn as an empty box.
 */
export function shapeRuns(text: string, style: TextStyle): Run[] {
  const runs: Run[] = [];
  const push = (t: string, face: string, size: number, rise: number): void => {
    const last = runs[runs.length - 1];
    if (last && last.face === face && last.size === size && last.rise === rise) last.text += t;
    else runs.push({ text: t, face, size, rise, color: style.color });
  };
  const emit = (ch: string, size: number, rise: number, depth: number): void => {
    const cp = ch.codePointAt(0) ?? 0x3f;
    const face = faceFor(style.weight, cp);
    if (face) {
      push(ch, face.key, size, rise);
      return;
    }
    if (depth > 1) {
      push('?', fontChains()[style.weight][0]!.key, size, rise);
      return;
    }
    const shift = scriptShift(cp);
    const replacement = REPLACEMENTS[ch] ?? ch.normalize('NFKC');
    const small = size * SCRIPT_SCALE;
    const nextSize = shift ? small : size;
    const nextRise = shift === 'sup' ? rise + size * 0.36 : shift === 'sub' ? rise - size * 0.12 : rise;
    const chars = replacement === ch ? ['?'] : [...replacement];
    for (const c of chars) emit(c, nextSize, nextRise, depth + 1);
  };
  for (const ch of text) emit(ch, style.size, 0, 0);
  return runs;
}

/** Characters of `text` that would be replaced rather than drawn from a font. */
export function uncoveredCharacters(text: string, weight: Weight = 400): string[] {
  return [...new Set([...text])].filter((ch) => faceFor(weight, ch.codePointAt(0) ?? 0) === null);
}

/*
 * Measuring goes through fontkit's shaper and dominated the render time; the same strings recur within a report
 * and from one report to the next. A width depends only on the face, the size and the text (every document
 * shares the same parsed faces), so the measurements are kept for the whole process, up to WIDTH_CACHE_MAX.
 */
const WIDTH_CACHE_MAX = 50_000;
const widthCache = new Map<string, number>();

// Faces a document has opened. A document opens each face it measures or draws with, in the order first used,
// exactly as when every document measured for itself: that order names pdfkit's font resources, so it is what
// keeps a document's bytes the same whatever was rendered before it in the process.
const openedFaces = new WeakMap<Doc, Set<string>>();

function runWidth(doc: Doc, run: Run): number {
  let opened = openedFaces.get(doc);
  if (!opened) openedFaces.set(doc, (opened = new Set()));
  if (!opened.has(run.face)) {
    opened.add(run.face);
    useFace(doc, run.face);
  }
  const key = `${run.face}\u0000${run.size}\u0000${run.text}`;
  let width = widthCache.get(key);
  if (width === undefined) {
    width = useFace(doc, run.face).fontSize(run.size).widthOfString(run.text);
    if (widthCache.size >= WIDTH_CACHE_MAX) widthCache.clear();
    widthCache.set(key, width);
  }
  return width;
}

function mergeRuns(runs: Run[]): Run[] {
  const out: Run[] = [];
  for (const r of runs) {
    const last = out[out.length - 1];
    if (last && last.face === r.face && last.size === r.size && last.rise === r.rise && last.color === r.color) {
      last.text += r.text;
    } else out.push({ ...r });
  }
  return out;
}

interface Word {
  runs: Run[];
  width: number;
  space: Run[];
}

type Item = Word | 'newline';

function toItems(doc: Doc, segments: Segment[]): Item[] {
  const items: Item[] = [];
  let word: Word | null = null;
  const flush = (): void => {
    if (word) items.push(word);
    word = null;
  };
  for (const seg of segments) {
    const text = seg.text.replace(/\r\n?/g, '\n');
    for (const m of text.matchAll(/(\n)|([^\S\n]+)|(\S+)/g)) {
      if (m[1]) {
        flush();
        items.push('newline');
      } else if (m[2]) {
        const current = word as Word | null;
        if (current) {
          current.space = shapeRuns(' ', seg.style);
          flush();
        } else {
          const prev = items[items.length - 1];
          if (prev && prev !== 'newline' && prev.space.length === 0) prev.space = shapeRuns(' ', seg.style);
        }
      } else if (m[3]) {
        const runs = shapeRuns(m[3], seg.style);
        const width = runs.reduce((w, r) => w + runWidth(doc, r), 0);
        const current = word as Word | null;
        if (current) {
          current.runs.push(...runs);
          current.width += width;
        } else word = { runs, width, space: [] };
      }
    }
  }
  flush();
  return items;
}

/** Breaks a word wider than the line into pieces that fit, character by character. */
function splitWord(doc: Doc, word: Word, maxWidth: number): Word[] {
  const pieces: Word[] = [];
  let current: Word = { runs: [], width: 0, space: [] };
  for (const run of word.runs) {
    for (const ch of run.text) {
      const r: Run = { ...run, text: ch };
      const w = runWidth(doc, r);
      // Characters shaped together can kern wider than their widths added up: the joined piece is what must fit.
      const wider = (): boolean => finishLine(doc, [{ ...current, runs: [...current.runs, r] }]).width > maxWidth;
      if (current.runs.length > 0 && (current.width + w > maxWidth || wider())) {
        pieces.push(current);
        current = { runs: [], width: 0, space: [] };
      }
      current.runs.push(r);
      current.width += w;
    }
  }
  current.space = word.space;
  pieces.push(current);
  return pieces;
}

function finishLine(doc: Doc, words: Word[]): Line {
  const runs: Run[] = [];
  words.forEach((w, i) => {
    if (i > 0) runs.push(...(words[i - 1]?.space ?? []));
    runs.push(...w.runs);
  });
  const merged = mergeRuns(runs);
  return { runs: merged, width: merged.reduce((sum, r) => sum + runWidth(doc, r), 0) };
}

/** Greedy wrapping; '\n' starts a new line, an empty line stays as a blank line. */
export function wrapSegments(doc: Doc, segments: Segment[], maxWidth: number): Line[] {
  const lines: Line[] = [];
  let current: Word[] = [];
  let width = 0;
  let sawContent = false;
  for (const item of toItems(doc, segments)) {
    if (item === 'newline') {
      lines.push(finishLine(doc, current));
      current = [];
      width = 0;
      continue;
    }
    sawContent = true;
    const pieces = item.width > maxWidth ? splitWord(doc, item, maxWidth) : [item];
    for (const piece of pieces) {
      const prev = current[current.length - 1];
      const gap = prev ? prev.space.reduce((w, r) => w + runWidth(doc, r), 0) : 0;
      // Joined runs are shaped as one, so the line can measure a little wider than its pieces added up: the
      // joined line is what must fit.
      if (current.length > 0 && (width + gap + piece.width > maxWidth || finishLine(doc, [...current, piece]).width > maxWidth)) {
        lines.push(finishLine(doc, current));
        current = [piece];
        width = piece.width;
      } else {
        current.push(piece);
        width += gap + piece.width;
      }
    }
  }
  if (current.length > 0 || !sawContent) lines.push(finishLine(doc, current));
  return lines;
}

export function wrapText(doc: Doc, text: string, style: TextStyle, maxWidth: number): Line[] {
  return wrapSegments(doc, [{ text, style }], maxWidth);
}

export function textWidth(doc: Doc, text: string, style: TextStyle): number {
  return shapeRuns(text, style).reduce((w, r) => w + runWidth(doc, r), 0);
}

/** Draws one line with its baseline at `baseline`. */
export function drawLine(
  doc: Doc,
  line: Line,
  x: number,
  baseline: number,
  align: 'left' | 'right' | 'center' = 'left',
  boxWidth = 0,
): void {
  let cx = align === 'right' ? x + boxWidth - line.width : align === 'center' ? x + (boxWidth - line.width) / 2 : x;
  for (const run of line.runs) {
    useFace(doc, run.face)
      .fontSize(run.size)
      .fillColor(run.color)
      .text(run.text, cx, baseline - run.rise, { lineBreak: false, baseline: 'alphabetic' });
    cx += runWidth(doc, run);
  }
}
