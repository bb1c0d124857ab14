import type { AssayCode } from '@/schemas/common';
import type { WellRole } from '@/schemas/plate';
import { runGroupId, runWellOwner, type RunWell } from '@/schemas/run';
import { fillPattern, layEntries, type BlockPattern } from '@/utils/plate-grid';

/** What a click or a fill lays down: a specimen's or a control's well in a group, a plate blank, or nothing. */
export type RunBrush = {
  use: 'specimen' | 'control' | 'blank' | 'erase';
  specimenId: number | null;
  controlMaterialId: number | null;
  assay: AssayCode;
  role: WellRole;
  replicate: number;
};

/** Who a group belongs to, in words and as a short key for small wells. */
export type OwnerName = { key: string; label: string };
export type OwnerNames = Map<string, OwnerName>;

/** A plate blank or a group's blank both leave the well free of sample. */
const isBlank = (e: RunWell) => e.use === 'blank' || e.role === 'blank';
const sameGroup = (a: RunWell, b: RunWell) =>
  a.use === 'blank' || b.use === 'blank' ? a.use === b.use : runGroupId(a) === runGroupId(b);

/**
 * The entries a brush writes on the chosen wells. A specimen or control needs choosing first; the pattern counts
 * replicates per column or lays total/background pairs (plate-grid's fillPattern). Erasing writes nothing.
 */
export function entriesFor(wells: string[], brush: RunBrush, pattern: BlockPattern): { entries: RunWell[]; error: null } | { entries: null; error: string } {
  if (brush.use === 'erase') return { entries: [], error: null };
  if (brush.use === 'blank') return { entries: wells.map((well) => ({ use: 'blank', well })), error: null };
  const base = { assay: brush.assay, role: brush.role, replicate: brush.replicate };
  if (brush.use === 'specimen') {
    if (brush.specimenId === null) return { entries: null, error: 'Choose the specimen to place first' };
    return { entries: fillPattern(wells, { use: 'specimen' as const, specimenId: brush.specimenId, ...base }, pattern), error: null };
  }
  if (brush.controlMaterialId === null) return { entries: null, error: 'Choose the control material to place first' };
  return { entries: fillPattern(wells, { use: 'control' as const, controlMaterialId: brush.controlMaterialId, ...base }, pattern), error: null };
}

/**
 * Lays the brush on wells: erasing empties them; otherwise the entries go on as the plate-map editor lays them
 * (a blank beside other blanks is shared, anything else replaces the well).
 */
export function paint(current: RunWell[], wells: string[], brush: RunBrush, pattern: BlockPattern, toggleSharedBlank = false): { wells: RunWell[]; error: string | null } {
  if (brush.use === 'erase') {
    const gone = new Set(wells);
    return { wells: current.filter((e) => !gone.has(e.well)), error: null };
  }
  const made = entriesFor(wells, brush, pattern);
  if (made.error !== null) return { wells: current, error: made.error };
  return { wells: layEntries(current, made.entries, { isBlank, sameGroup }, toggleSharedBlank), error: null };
}

/** Short keys for the owners on the plate, in the order they first appear: specimens S1, S2, …; controls Q1, Q2, …. */
export function ownerKeys(wells: RunWell[], label: (owner: string) => string): OwnerNames {
  const names: OwnerNames = new Map();
  let s = 0;
  let q = 0;
  for (const w of wells) {
    if (w.use === 'blank') continue;
    const owner = runWellOwner(w);
    if (names.has(owner)) continue;
    const key = w.use === 'specimen' ? `S${(s += 1)}` : `Q${(q += 1)}`;
    names.set(owner, { key, label: label(owner) });
  }
  return names;
}

const roleWords: Record<WellRole, string> = { total: 'total', background: 'background', blank: 'blank' };

/** One entry in words, e.g. "C-2026-0003 specimen A · CI · total · replicate 1", or "plate blank". */
export function describeEntry(e: RunWell, names: OwnerNames): string {
  if (e.use === 'blank') return 'plate blank (no sample)';
  const who = names.get(runWellOwner(e))?.label ?? runWellOwner(e);
  return `${who} · ${e.assay} · ${roleWords[e.role]} · replicate ${e.replicate}`;
}

/**
 * A layout problem in the user's words: the schema names groups by id ("Specimen 12 CI replicate 1"); here they
 * become the case and specimen, or the control's material, lot and level, and the well leads the line.
 */
export function nameProblem(message: string, well: string | null, names: OwnerNames): string {
  const named = message
    .replace(/Specimen (\d+)/g, (m, id: string) => names.get(`specimen:${id}`)?.label ?? m)
    .replace(/Control material (\d+)/g, (m, id: string) => names.get(`control:${id}`)?.label ?? m);
  return well && !named.startsWith(`Well ${well}`) ? `Well ${well}: ${named}` : named;
}

/** The entry index a field path or dotted key points at ("wells.3.role" → 3), or null. */
export function wellIndexOf(path: readonly PropertyKey[] | string): number | null {
  const parts = typeof path === 'string' ? path.split('.') : path.map(String);
  const at = parts.indexOf('wells');
  if (at < 0) return null;
  const n = Number(parts[at + 1]);
  return Number.isInteger(n) ? n : null;
}
