import { assayCodes } from '@/schemas/common';
import {
  plateGroupKey,
  plateMapSchema,
  type MappedPlate,
  type MappedTraceGroup,
  type ParsedWell,
  type PlateIssue,
  type PlateMap,
  type PlateMapEntry,
  type PlateParseResult,
  type TracePoint,
} from '@/schemas/plate';
import { IssueList } from './errors';
import { parsePlateFile } from './parse-plate';

function traceOf(timesS: number[], well: ParsedWell): TracePoint[] {
  return timesS.map((t, i) => ({ t, a: well.absorbances[i]! }));
}

function describeUse(e: PlateMapEntry): string {
  return `${e.specimenRef} ${e.assay} ${e.role}, replicate ${e.replicate}`;
}

/**
 * Validates the map (same rules as the shared schema) and returns its parsed form, or throws
 * PlateImportError with code MAP_INVALID issues naming the entry and its well.
 */
function checkMap(map: PlateMap): PlateMap {
  const result = plateMapSchema.safeParse(map);
  if (result.success) return result.data;
  const issues: IssueList = new IssueList();
  for (const zi of result.error.issues) {
    const [top, index, field] = zi.path;
    if (top === 'wells' && typeof index === 'number') {
      const raw: unknown = Array.isArray(map.wells) ? map.wells[index] : undefined;
      const well =
        raw !== null && typeof raw === 'object' && 'well' in raw && typeof raw.well === 'string'
          ? raw.well
          : null;
      const what = typeof field === 'string' ? ` (${field})` : '';
      issues.add('MAP_INVALID', `Plate map entry ${index + 1}${what}: ${zi.message}`, {
        column: well,
      });
    } else {
      const what = zi.path.length > 0 ? ` (${zi.path.join('.')})` : '';
      issues.add('MAP_INVALID', `Plate map${what}: ${zi.message}`);
    }
  }
  return issues.fail();
}

/**
 * Joins parsed readings with a plate map: one group per specimen label × assay × replicate, with
 * the total trace and, when mapped, the background and blank traces. Throws PlateImportError when
 * the map is invalid or names a well that the file does not have (MISSING_WELL, located at the
 * header line). Wells in the file that the map does not use are returned as UNMAPPED_WELL
 * warnings, not errors: plate readers commonly export the whole plate.
 */
export function applyPlateMap(parsed: PlateParseResult, map: PlateMap): MappedPlate {
  return mapCheckedEntries(parsed, checkMap(map).wells);
}

/**
 * applyPlateMap for entries already checked by their own schema (a run's layout, whose wells may lie
 * beyond H12 and whose labels are the run's group owners).
 */
export function mapCheckedEntries(parsed: PlateParseResult, entries: PlateMapEntry[]): MappedPlate {
  const checked = { wells: entries };
  const byWell = new Map(parsed.wells.map((w) => [w.well, w]));
  const issues: IssueList = new IssueList();

  const usesByWell = new Map<string, PlateMapEntry[]>();
  for (const e of checked.wells) {
    const uses = usesByWell.get(e.well);
    if (uses) uses.push(e);
    else usesByWell.set(e.well, [e]);
  }
  for (const [well, uses] of usesByWell) {
    if (!byWell.has(well)) {
      issues.add(
        'MISSING_WELL',
        `The plate map uses well ${well} (${uses.map(describeUse).join('; ')}) but the file has no ${well} column.`,
        { row: parsed.headerLine, column: well },
      );
    }
  }
  issues.throwIfAny();

  const groups = new Map<string, MappedTraceGroup>();
  const specimenOrder = new Map<string, number>();
  // Totals first, so every background and blank finds its group (the schema guarantees a total).
  const ordered = [...checked.wells].sort(
    (x, y) => Number(x.role !== 'total') - Number(y.role !== 'total'),
  );
  for (const e of checked.wells) {
    if (!specimenOrder.has(e.specimenRef)) specimenOrder.set(e.specimenRef, specimenOrder.size);
  }
  for (const e of ordered) {
    const trace = traceOf(parsed.timesS, byWell.get(e.well)!);
    const key = plateGroupKey(e);
    if (e.role === 'total') {
      groups.set(key, {
        specimenRef: e.specimenRef,
        assay: e.assay,
        replicate: e.replicate,
        wells: { total: e.well },
        total: trace,
      });
    } else {
      const g = groups.get(key)!;
      g.wells[e.role] = e.well;
      g[e.role] = trace;
    }
  }

  const sorted = [...groups.values()].sort(
    (x, y) =>
      specimenOrder.get(x.specimenRef)! - specimenOrder.get(y.specimenRef)! ||
      assayCodes.indexOf(x.assay) - assayCodes.indexOf(y.assay) ||
      x.replicate - y.replicate,
  );

  const warnings: PlateIssue[] = parsed.wells
    .filter((w) => !usesByWell.has(w.well))
    .map((w) => ({
      code: 'UNMAPPED_WELL',
      row: parsed.headerLine,
      column: w.header,
      columnNumber: w.columnNumber,
      message: `Well ${w.well} is in the file but not in the plate map; its readings are not used.`,
    }));

  return { groups: sorted, warnings };
}

/** Parses the file and applies the map in one step; throws PlateImportError. */
export function importPlateFile(
  input: Uint8Array | string,
  map: PlateMap,
): { parsed: PlateParseResult; mapped: MappedPlate } {
  const parsed = parsePlateFile(input);
  return { parsed, mapped: applyPlateMap(parsed, map) };
}
