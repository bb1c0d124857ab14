import type { PlateMapEntry } from '@/schemas/plate';
import { blockPatternLabels, blockWells as gridBlockWells, fillPattern, type BlockPattern } from '@/utils/plate-grid';

export type Brush = Omit<PlateMapEntry, 'well'>;

/** Wells of the rectangle between two corners of the 96-well plate, row by row. */
export function blockWells(from: string, to: string): string[] | null {
  return gridBlockWells(from, to, 96);
}

export { blockPatternLabels, type BlockPattern };

/** The entries a block fill writes, well by well, following the pattern. */
export function fillBlock(wells: string[], brush: Brush, pattern: BlockPattern): PlateMapEntry[] {
  return fillPattern(wells, brush, pattern);
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

