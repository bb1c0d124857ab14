import { plateColumnCount, plateRowLetters, type PlateMapEntry, type WellRole } from '@/schemas/plate';

export type Brush = Omit<PlateMapEntry, 'well'>;

/** Wells of the rectangle between two corners, row by row. */
export function blockWells(from: string, to: string): string[] | null {
  const parse = (w: string) => {
    const m = /^([A-Ha-h])(\d{1,2})$/.exec(w.trim());
    if (!m) return null;
    const col = Number(m[2]);
    if (col < 1 || col > plateColumnCount) return null;
    return { row: plateRowLetters.indexOf(m[1]!.toUpperCase() as (typeof plateRowLetters)[number]), col };
  };
  const a = parse(from);
  const b = parse(to);
  if (!a || !b) return null;
  const wells: string[] = [];
  for (let r = Math.min(a.row, b.row); r <= Math.max(a.row, b.row); r += 1) {
    for (let c = Math.min(a.col, b.col); c <= Math.max(a.col, b.col); c += 1) wells.push(`${plateRowLetters[r]}${c}`);
  }
  return wells;
}

export type BlockPattern = 'same' | 'replicate-per-column' | 'pairs-per-column';

export const blockPatternLabels: Record<BlockPattern, string> = {
  same: 'Every well gets the settings above',
  'replicate-per-column': 'Replicate goes up by one per column',
  'pairs-per-column': 'Column pairs: total then background, replicate up by one per pair',
};

/** The entries a block fill writes, well by well, following the pattern. */
export function fillBlock(wells: string[], brush: Brush, pattern: BlockPattern): PlateMapEntry[] {
  if (wells.length === 0) return [];
  const firstCol = Math.min(...wells.map((w) => Number(w.slice(1))));
  return wells.map((well) => {
    const offset = Number(well.slice(1)) - firstCol;
    if (pattern === 'replicate-per-column') return { ...brush, well, replicate: brush.replicate + offset };
    if (pattern === 'pairs-per-column') {
      const role: WellRole = offset % 2 === 0 ? 'total' : 'background';
      return { ...brush, well, role, replicate: brush.replicate + Math.floor(offset / 2) };
    }
    return { ...brush, well };
  });
}

/**
 * Puts entries on the layout. A blank may serve several groups, so a blank laid on a well that holds only blanks
 * is added beside them (or removed, when the same group is already there); anything else replaces the well.
 */
export function applyEntries(current: PlateMapEntry[], entries: PlateMapEntry[], toggleSharedBlank = false): PlateMapEntry[] {
  let next = [...current];
  for (const e of entries) {
    const here = next.filter((x) => x.well === e.well);
    const sameGroup = (x: PlateMapEntry) => x.specimenRef === e.specimenRef && x.assay === e.assay && x.replicate === e.replicate;
    if (e.role === 'blank' && here.length > 0 && here.every((x) => x.role === 'blank')) {
      if (here.some(sameGroup)) {
        if (toggleSharedBlank) next = next.filter((x) => !(x.well === e.well && sameGroup(x)));
      } else next.push(e);
      continue;
    }
    next = [...next.filter((x) => x.well !== e.well), e];
  }
  return next;
}

