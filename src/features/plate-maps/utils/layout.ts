import type { PlateMapEntry } from '@/schemas/plate';
import { blockPatternLabels, blockWells as gridBlockWells, fillPattern, layEntries, type BlockPattern } from '@/utils/plate-grid';

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
  const sameGroup = (x: PlateMapEntry, e: PlateMapEntry) => x.specimenRef === e.specimenRef && x.assay === e.assay && x.replicate === e.replicate;
  return layEntries(current, entries, { isBlank: (e) => e.role === 'blank', sameGroup }, toggleSharedBlank);
}
