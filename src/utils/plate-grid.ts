/*
 * Plate geometry shared by the layout editors: 24-well (4 × 6), 96-well (8 × 12) and 384-well (16 × 24) plates,
 * rows lettered from A and columns numbered from 1, A1 top left (ANSI/SLAS 4-2004 footprint and well positions)
 * [from memory]; the geometry itself is src/schemas/plate.ts's. Pure functions on well names only; what a well holds
 * is the caller's business.
 */
import { normaliseWellIdFor, plateDimensions, plateRowsOf, type PlateFormat } from '@/schemas/plate';

export type { PlateFormat };

/** Row letters of the largest plate, A to P. */
const LETTERS = plateRowsOf(384);

/** Row letters and column count of a plate format. */
export function plateShape(format: PlateFormat): { rows: string[]; columns: number } {
  return { rows: plateRowsOf(format), columns: plateDimensions[format].columns };
}

/** The last well of a plate, e.g. "H12" for 96 wells. */
export function lastWell(format: PlateFormat): string {
  const { rows, columns } = plateShape(format);
  return `${rows[rows.length - 1]}${columns}`;
}

/** Row index (0-based) and column (1-based) of a well written as people write it ("b3", "B03"), or null off the plate. */
export function locateWell(raw: string, format: PlateFormat): { row: number; col: number } | null {
  const well = normaliseWellIdFor(raw, format);
  if (!well) return null;
  return { row: LETTERS.indexOf(well[0]!), col: Number(well.slice(1)) };
}

function nameOf(row: number, col: number): string {
  return `${LETTERS[row]}${col}`;
}

/** Wells of the rectangle between two corner wells, row by row; null when a corner is not on the plate. */
export function blockWells(from: string, to: string, format: PlateFormat = 96): string[] | null {
  const a = locateWell(from, format);
  const b = locateWell(to, format);
  if (!a || !b) return null;
  const wells: string[] = [];
  for (let r = Math.min(a.row, b.row); r <= Math.max(a.row, b.row); r += 1) {
    for (let c = Math.min(a.col, b.col); c <= Math.max(a.col, b.col); c += 1) wells.push(nameOf(r, c));
  }
  return wells;
}

/**
 * Reads a selection of wells typed as a list: "A1", a block "A1:D6" (or "A1-D6"), a whole row "C", a whole column
 * "5", separated by commas or spaces. Wells come back once each, in the order first named.
 */
export function parseWellSelection(text: string, format: PlateFormat): { wells: string[]; error: null } | { wells: null; error: string } {
  const { rows, columns } = plateShape(format);
  const parts = text
    .split(/[,;\s]+/)
    .map((p) => p.trim())
    .filter(Boolean);
  if (parts.length === 0) return { wells: null, error: 'Name the wells: e.g. A1, A1:D6, a row letter or a column number' };
  const seen = new Set<string>();
  const out: string[] = [];
  const add = (ws: string[]) => {
    for (const w of ws) {
      if (seen.has(w)) continue;
      seen.add(w);
      out.push(w);
    }
  };
  for (const part of parts) {
    const range = /^([A-Za-z]\d{1,2})\s*[:\u2013-]\s*([A-Za-z]\d{1,2})$/.exec(part);
    if (range) {
      const ws = blockWells(range[1]!, range[2]!, format);
      if (!ws) return { wells: null, error: `“${part}” is not a block of this ${format}-well plate (A1 to ${lastWell(format)})` };
      add(ws);
    } else if (/^[A-Za-z]$/.test(part)) {
      const row = rows.indexOf(part.toUpperCase());
      if (row < 0) return { wells: null, error: `Row ${part.toUpperCase()} is not on a ${format}-well plate (rows A to ${rows[rows.length - 1]})` };
      add(Array.from({ length: columns }, (_, i) => nameOf(row, i + 1)));
    } else if (/^\d{1,2}$/.test(part)) {
      const col = Number(part);
      if (col < 1 || col > columns) return { wells: null, error: `Column ${col} is not on a ${format}-well plate (columns 1 to ${columns})` };
      add(rows.map((_, r) => nameOf(r, col)));
    } else {
      const at = locateWell(part, format);
      if (!at) return { wells: null, error: `“${part}” is not a well of this ${format}-well plate (A1 to ${lastWell(format)})` };
      add([nameOf(at.row, at.col)]);
    }
  }
  return { wells: out, error: null };
}

/** How a fill lays replicates and roles across the chosen wells. */
export type BlockPattern = 'same' | 'replicate-per-column' | 'pairs-per-column';

export const blockPatternLabels: Record<BlockPattern, string> = {
  same: 'Every well gets the settings above',
  'replicate-per-column': 'Replicate goes up by one per column',
  'pairs-per-column': 'Column pairs: total then background, replicate up by one per pair',
};

/**
 * What a fill writes, well by well: the brush's settings, with the replicate counted up per column from the
 * leftmost chosen column (or per pair of columns, the first of each pair total and the second background).
 */
export function fillPattern<B extends { replicate: number; role: string }>(
  wells: string[],
  brush: B,
  pattern: BlockPattern,
): (B & { well: string })[] {
  if (wells.length === 0) return [];
  const colOf = (w: string) => Number(w.slice(1));
  const firstCol = Math.min(...wells.map(colOf));
  return wells.map((well) => {
    const offset = colOf(well) - firstCol;
    if (pattern === 'replicate-per-column') return { ...brush, well, replicate: brush.replicate + offset };
    if (pattern === 'pairs-per-column') {
      return { ...brush, well, role: offset % 2 === 0 ? 'total' : 'background', replicate: brush.replicate + Math.floor(offset / 2) };
    }
    return { ...brush, well };
  });
}

/**
 * The entries of a source block moved so the block's top-left well lands on `to`: each keeps its settings and
 * takes the well at the same offset. Entries outside the block are not copied; a copy that would run off the
 * plate is refused with the well that falls off.
 */
export function copyBlock<E extends { well: string }>(
  entries: E[],
  from: string,
  to: string,
  format: PlateFormat,
  target: string,
): { entries: E[]; error: null } | { entries: null; error: string } {
  const a = locateWell(from, format);
  const b = locateWell(to, format);
  const t = locateWell(target, format);
  if (!a || !b) return { entries: null, error: `The block to copy must be two corner wells of this plate (A1 to ${lastWell(format)})` };
  if (!t) return { entries: null, error: `Copy to: “${target}” is not a well of this ${format}-well plate` };
  const top = Math.min(a.row, b.row);
  const left = Math.min(a.col, b.col);
  const { rows, columns } = plateShape(format);
  const out: E[] = [];
  for (const e of entries) {
    const at = locateWell(e.well, format);
    if (!at || at.row < top || at.row > Math.max(a.row, b.row) || at.col < left || at.col > Math.max(a.col, b.col)) continue;
    const row = t.row + (at.row - top);
    const col = t.col + (at.col - left);
    if (row >= rows.length || col > columns) {
      return { entries: null, error: `Copying ${e.well} to ${target} would put it off the plate (past ${lastWell(format)})` };
    }
    out.push({ ...e, well: nameOf(row, col) });
  }
  if (out.length === 0) return { entries: null, error: `Nothing is laid out in ${from}:${to} to copy` };
  return { entries: out, error: null };
}

/**
 * Puts entries on a layout. A blank may serve several groups, so a blank laid on a well that holds only blanks is
 * added beside them (or, with `toggleSharedBlank`, taken off when the same group's blank is already there);
 * anything else replaces whatever the well held.
 */
export function layEntries<E extends { well: string }>(
  current: E[],
  entries: E[],
  rules: { isBlank: (e: E) => boolean; sameGroup: (a: E, b: E) => boolean },
  toggleSharedBlank = false,
): E[] {
  let next = [...current];
  for (const e of entries) {
    const here = next.filter((x) => x.well === e.well);
    if (rules.isBlank(e) && here.length > 0 && here.every(rules.isBlank)) {
      if (here.some((x) => rules.sameGroup(x, e))) {
        if (toggleSharedBlank) next = next.filter((x) => !(x.well === e.well && rules.sameGroup(x, e)));
      } else next.push(e);
      continue;
    }
    next = [...next.filter((x) => x.well !== e.well), e];
  }
  return next;
}
