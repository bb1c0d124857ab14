import { z } from 'zod';
import { tracePointSchema, type TracePoint } from './assay';
import { assayCodeSchema, plainText } from './common';

/*
 * Kinetic plate files and plate maps, shared by the upload screen and the server.
 * The file layout itself is described for laboratory users in docs/plate-file-format.md.
 */

/** Largest plate file accepted, in bytes (2 MiB). The UI can check this before uploading. */
export const MAX_PLATE_FILE_BYTES = 2 * 1024 * 1024;

/** Name of the first header column: seconds since the start of the read. */
export const PLATE_TIME_COLUMN = 'time_s';

/** A slope needs at least two readings. */
export const MIN_PLATE_READINGS = 2;

/** At most this many issues are listed on one failed import; the rest are only counted. */
export const MAX_PLATE_ISSUES = 50;

// 96-well plate: rows A–H, columns 1–12, A1 top left (ANSI/SLAS 4-2004 well positions) [from memory].
export const plateRowLetters = ['A', 'B', 'C', 'D', 'E', 'F', 'G', 'H'] as const;
export const plateColumnCount = 12;

/** The 96 well ids in reading order: A1, A2, …, A12, B1, …, H12. */
export const plateWellIds: readonly string[] = plateRowLetters.flatMap((row) =>
  Array.from({ length: plateColumnCount }, (_, i) => `${row}${i + 1}`),
);

/** Plate formats Cristae reads: 24, 96 and 384 wells. */
export const plateFormats = [24, 96, 384] as const;
export type PlateFormat = (typeof plateFormats)[number];
export const plateFormatSchema = z.literal(plateFormats, { error: 'Plate format must be 24, 96 or 384 wells' });

// Rows × columns of the standard footprints, A1 top left (ANSI/SLAS 4-2004 well positions) [from memory]:
// 24 wells = 4 × 6 (A–D, 1–6), 96 = 8 × 12 (A–H, 1–12), 384 = 16 × 24 (A–P, 1–24).
export const plateDimensions: Record<PlateFormat, { rows: number; columns: number }> = {
  24: { rows: 4, columns: 6 },
  96: { rows: 8, columns: 12 },
  384: { rows: 16, columns: 24 },
};

const ROW_LETTERS = 'ABCDEFGHIJKLMNOP';

/** The row letters of a plate format, A first. */
export function plateRowsOf(format: PlateFormat): string[] {
  return [...ROW_LETTERS.slice(0, plateDimensions[format].rows)];
}

/** Every well id of a plate format in reading order (A1, A2, …, then B1, …). */
export function wellIdsOf(format: PlateFormat): string[] {
  const { columns } = plateDimensions[format];
  return plateRowsOf(format).flatMap((row) => Array.from({ length: columns }, (_, i) => `${row}${i + 1}`));
}

/** "A1 to H12 (row letter A–H, column 1–12)" for messages. */
export function describeWellRange(format: PlateFormat): string {
  const { rows, columns } = plateDimensions[format];
  const lastRow = ROW_LETTERS[rows - 1]!;
  return `A1 to ${lastRow}${columns} (row letter A–${lastRow}, column 1–${columns})`;
}

/**
 * Reads a well name as people and programs write it ("B3", "b3", "B03", " B3 ") and returns the canonical id,
 * or null when it is not a well of a plate of this format.
 */
export function normaliseWellIdFor(raw: string, format: PlateFormat): string | null {
  const m = /^([A-Za-z])0*(\d{1,2})$/.exec(raw.trim());
  if (!m) return null;
  const row = ROW_LETTERS.indexOf(m[1]!.toUpperCase());
  const col = Number(m[2]);
  const { rows, columns } = plateDimensions[format];
  if (row < 0 || row >= rows || col < 1 || col > columns) return null;
  return `${ROW_LETTERS[row]}${col}`;
}

/** A well of the largest plate (384: A1 to P24) in canonical form; shapes that hold wells of any format. */
export const anyWellIdSchema = z
  .string()
  .regex(/^[A-P](?:[1-9]|1\d|2[0-4])$/, 'Well must be A1 to P24 (row A–P, column 1–24)');

const canonicalWellPattern = /^[A-H](?:[1-9]|1[0-2])$/;

/** A well in canonical form: capital row letter, column number without leading zero. */
export const wellIdSchema = z
  .string()
  .regex(canonicalWellPattern, 'Well must be A1 to H12 (row A–H, column 1–12)');
export type WellId = z.infer<typeof wellIdSchema>;

/**
 * Reads a well name as people and programs write it ("B3", "b3", "B03", " B3 ") and returns the
 * canonical id, or null when it is not a well of a 96-well plate.
 */
export function normaliseWellId(raw: string): WellId | null {
  return normaliseWellIdFor(raw, 96);
}

/** What a mapped well holds within its specimen × assay × replicate group. */
export const wellRoles = ['total', 'background', 'blank'] as const;
export const wellRoleSchema = z.enum(wellRoles);
export type WellRole = z.infer<typeof wellRoleSchema>;

export const wellRoleLabels: Record<WellRole, string> = {
  total: 'Total (no inhibitor)',
  background: 'Background (inhibitor or baseline)',
  blank: 'Blank (no sample)',
};

export const plateMapEntrySchema = z.object({
  well: wellIdSchema,
  /** A short label the upload screen links to a specimen of the case, e.g. "S1". */
  specimenRef: z
    .string()
    .trim()
    .min(1, 'Specimen label is required')
    .max(40, 'Specimen label is at most 40 characters')
    .superRefine(plainText('Specimen label')),
  assay: assayCodeSchema,
  role: wellRoleSchema,
  replicate: z.number().int('Replicate must be a whole number').min(1, 'Replicate starts at 1'),
});
export type PlateMapEntry = z.infer<typeof plateMapEntrySchema>;

type GroupFields = Pick<PlateMapEntry, 'specimenRef' | 'assay' | 'replicate'>;

function groupLabel(e: GroupFields): string {
  return `${e.specimenRef} ${e.assay} replicate ${e.replicate}`;
}

/** Identity of a specimen × assay × replicate group; the schema keeps control characters out of labels. */
export function plateGroupKey(e: GroupFields): string {
  return `${e.specimenRef}\u0000${e.assay}\u0000${e.replicate}`;
}

/** An entry as the cross-entry rules see it. */
type CheckedEntry = GroupFields & { well: string; role: WellRole };

/**
 * Rules across entries (the single-case plate map and the run layout share them):
 * - a well is listed once, except a shared blank: a well may serve as the blank of several groups
 *   if every listing of it has role "blank";
 * - each specimen × assay × replicate group has exactly one total and at most one background and
 *   one blank.
 * Each problem is reported with the entry's index and field; `describeGroup` names a group (default "S1 CI replicate 1").
 */
export function refinePlateEntries<E extends CheckedEntry>(
  entries: E[],
  report: (index: number, field: 'well' | 'role', message: string) => void,
  describeGroup: (e: E) => string = groupLabel,
): void {
  const byWell = new Map<string, number>();
  const byGroupRole = new Map<string, number>();
  const groupsWithTotal = new Set<string>();
  entries.forEach((e, i) => {
    const firstIndex = byWell.get(e.well);
    if (firstIndex === undefined) {
      byWell.set(e.well, i);
    } else {
      const first = entries[firstIndex]!;
      if (first.role !== 'blank' || e.role !== 'blank') {
        report(i, 'well', `Well ${e.well} is already mapped (entry ${firstIndex + 1}); only a blank can be shared`);
      }
    }
    const group = describeGroup(e);
    const key = `${plateGroupKey(e)}\u0000${e.role}`;
    const seen = byGroupRole.get(key);
    if (seen === undefined) byGroupRole.set(key, i);
    else report(i, 'role', `${group} already has a ${e.role} well (${entries[seen]!.well})`);
    if (e.role === 'total') groupsWithTotal.add(plateGroupKey(e));
  });
  entries.forEach((e, i) => {
    if (e.role !== 'total' && !groupsWithTotal.has(plateGroupKey(e))) {
      report(i, 'role', `${describeGroup(e)} has a ${e.role} well (${e.well}) but no total well`);
    }
  });
}

export const plateMapWellsSchema = z
  .array(plateMapEntrySchema)
  .min(1, 'A plate map needs at least one well')
  .max(384, 'A plate map lists at most 384 entries')
  .superRefine((entries, ctx) =>
    refinePlateEntries(entries, (i, field, message) => ctx.addIssue({ code: 'custom', path: [i, field], message })),
  );

export const plateMapSchema = z.object({
  name: z.string().trim().min(1, 'Name is required').max(120, 'Name is at most 120 characters').superRefine(plainText('Name')),
  wells: plateMapWellsSchema,
});
export type PlateMap = z.infer<typeof plateMapSchema>;

/** Saving a plate map as a reusable template. */
export const createPlateMapInputSchema = plateMapSchema.extend({
  description: z.string().trim().max(500, 'Description is at most 500 characters').superRefine(plainText('Description', true)).optional(),
});
export type CreatePlateMapInput = z.infer<typeof createPlateMapInputSchema>;
export const updatePlateMapInputSchema = createPlateMapInputSchema.partial();
export type UpdatePlateMapInput = z.infer<typeof updatePlateMapInputSchema>;

/* ----------------------------------------------------------------------------------------------
 * Import issues
 * -------------------------------------------------------------------------------------------- */

export const plateIssueCodes = [
  'FILE_TOO_LARGE',
  'NOT_TEXT',
  'EMPTY_FILE',
  'HEADER_ONLY',
  'TOO_FEW_READINGS',
  'WRONG_DELIMITER',
  'BAD_TIME_COLUMN',
  'EMPTY_COLUMN_NAME',
  'BAD_WELL_NAME',
  'DUPLICATE_WELL',
  'NO_WELL_COLUMNS',
  'COLUMN_COUNT',
  'EMPTY_CELL',
  'NOT_A_NUMBER',
  'TIME_NOT_INCREASING',
  'COMMENT_AFTER_HEADER',
  'BAD_QUOTING',
  'BAD_METADATA',
  'MAP_INVALID',
  'MISSING_WELL',
  'UNMAPPED_WELL',
] as const;
export const plateIssueCodeSchema = z.enum(plateIssueCodes);
export type PlateIssueCode = z.infer<typeof plateIssueCodeSchema>;

/**
 * One problem with an upload. `row` is the 1-based line number in the file (null when the problem
 * concerns the whole file); `column` is the header name as written in the file, or the well id for
 * plate-map problems; `columnNumber` is the 1-based position of that column in the file.
 */
export const plateIssueSchema = z.object({
  code: plateIssueCodeSchema,
  row: z.number().int().positive().nullable(),
  column: z.string().nullable(),
  columnNumber: z.number().int().positive().nullable(),
  message: z.string(),
});
export type PlateIssue = z.infer<typeof plateIssueSchema>;

/** "Line 7, column B3 (4): …" — one line of text for lists, logs and error summaries. */
export function describePlateIssue(issue: PlateIssue): string {
  const where: string[] = [];
  if (issue.row !== null) where.push(`line ${issue.row}`);
  if (issue.column !== null) {
    where.push(
      issue.columnNumber !== null
        ? `column ${issue.column} (${issue.columnNumber})`
        : `column ${issue.column}`,
    );
  } else if (issue.columnNumber !== null) {
    where.push(`column ${issue.columnNumber}`);
  }
  if (where.length === 0) return issue.message;
  const prefix = where.join(', ');
  return `${prefix.charAt(0).toUpperCase()}${prefix.slice(1)}: ${issue.message}`;
}

/* ----------------------------------------------------------------------------------------------
 * Parse result and mapped traces
 * -------------------------------------------------------------------------------------------- */

export const plateDelimiterSchema = z.enum(['comma', 'tab']);
export type PlateDelimiter = z.infer<typeof plateDelimiterSchema>;

export const parsedWellSchema = z.object({
  well: anyWellIdSchema,
  /** The header cell as written in the file (e.g. "b03"). */
  header: z.string(),
  columnNumber: z.number().int().min(2),
  /** One absorbance per reading, aligned with `timesS`. */
  absorbances: z.array(z.number()),
});
export type ParsedWell = z.infer<typeof parsedWellSchema>;

export const plateParseResultSchema = z
  .object({
    delimiter: plateDelimiterSchema,
    /** 1-based line number of the header line. */
    headerLine: z.number().int().positive(),
    /** `# key: value` comment lines above the header. */
    metadata: z.record(z.string(), z.string()),
    wavelengthNm: z.number().positive().nullable(),
    /** Reading times in seconds, strictly increasing. */
    timesS: z.array(z.number()).min(MIN_PLATE_READINGS),
    /** Well columns in file order. */
    wells: z.array(parsedWellSchema).min(1),
  })
  .superRefine((r, ctx) => {
    r.wells.forEach((w, i) => {
      if (w.absorbances.length !== r.timesS.length)
        ctx.addIssue({
          code: 'custom',
          path: ['wells', i, 'absorbances'],
          message: `Well ${w.well} has ${w.absorbances.length} readings for ${r.timesS.length} times`,
        });
    });
    for (let i = 1; i < r.timesS.length; i += 1) {
      if (!(r.timesS[i]! > r.timesS[i - 1]!))
        ctx.addIssue({ code: 'custom', path: ['timesS', i], message: 'Times must increase' });
    }
  });
export type PlateParseResult = z.infer<typeof plateParseResultSchema>;

/**
 * One reading: t in seconds since the start of the read, a in absorbance units. This is ./assay's schema
 * (strict, finite t and a), re-exported so plate code can import it with the other plate shapes. Mapped
 * groups only ever carry { t, a } built from finite parsed absorbances, so its strictness changes nothing here.
 */
export { tracePointSchema, type TracePoint };

export const mappedTraceGroupSchema = z.object({
  specimenRef: z.string(),
  assay: assayCodeSchema,
  replicate: z.number().int().min(1),
  wells: z.object({
    total: anyWellIdSchema,
    background: anyWellIdSchema.optional(),
    blank: anyWellIdSchema.optional(),
  }),
  total: z.array(tracePointSchema),
  background: z.array(tracePointSchema).optional(),
  blank: z.array(tracePointSchema).optional(),
});
export type MappedTraceGroup = z.infer<typeof mappedTraceGroupSchema>;

export const mappedPlateSchema = z.object({
  /** Ordered by specimen label (first appearance in the map), assay, replicate. */
  groups: z.array(mappedTraceGroupSchema),
  /** Wells in the file that the map does not use: reported, not an error (code UNMAPPED_WELL). */
  warnings: z.array(plateIssueSchema),
});
export type MappedPlate = z.infer<typeof mappedPlateSchema>;
