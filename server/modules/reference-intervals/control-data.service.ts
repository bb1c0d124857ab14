import { createHash } from 'node:crypto';
import type { Sequelize } from 'sequelize';
import { ACTIVITY_UNIT } from '@/schemas/assay';
import { specimenTypeLabels } from '@/schemas/common';
import type {
  ControlDataUploadResult,
  DeriveRequest,
  DeriveResult,
  PartitionCheckResult,
  VerificationRequest,
  VerificationResult,
} from '@/schemas/reference-interval';
import type { User } from '@/schemas/user';
import type {
  ControlPreview,
  ControlSelection,
  ControlUploadDetail,
  ControlUploadSummary,
  DraftFromControlsBody,
  PartitionBody,
  StoredInterval,
} from '@/schemas/reference-interval-api';
import { parseControlCsv } from '../../domain/reference-stats/control-csv';
import { derive, deriveInterval } from '../../domain/reference-stats/derive';
import { ReferenceStatsInputError } from '../../domain/reference-stats/errors';
import { screenOutliers } from '../../domain/reference-stats/outliers';
import { PCT_OF_MEAN_DEFAULTS } from '../../domain/reference-stats/parametric';
import { checkPartition, summarizeGroup } from '../../domain/reference-stats/partition';
import { verifyInterval } from '../../domain/reference-stats/verification';
import { AppError, badInput, fileRejected, notFound } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { ageBandText, methodDescriptions, outlierDescriptions } from './interval-labels';
import * as repo from './reference-intervals.repository';
import { insertDraft } from './reference-intervals.service';
import { writeTransaction } from '../../db/write-transaction';

/** Largest control file accepted (multer limit): about 20 000 subjects with every assay. */
export const MAX_CONTROL_FILE_BYTES = 2 * 1024 * 1024;

/** Age separating children from adults in the default partition check [common practice]. */
export const DEFAULT_SPLIT_AGE_YEARS = 16;

// ---------------------------------------------------------------------------------------------
// Computations that store nothing

/** POST /api/reference-intervals/derive */
export function deriveFromValues(request: DeriveRequest): DeriveResult {
  return derive(request);
}

/** POST /api/reference-intervals/verify */
export function verifyAdoptedInterval(request: VerificationRequest): VerificationResult {
  return verifyInterval(request);
}

/** POST /api/reference-intervals/partition */
export function checkGroups(body: PartitionBody): PartitionCheckResult {
  const [a, b] = body.groups;
  return checkPartition(summarizeGroup(a.label, a.values), summarizeGroup(b.label, b.values));
}

// ---------------------------------------------------------------------------------------------
// Control files

function decodeUtf8(content: Buffer): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(content);
  } catch {
    throw fileRejected('The file is not UTF-8 text; save it as CSV (UTF-8) and upload it again', [
      { row: null, column: null, message: 'The file is not UTF-8 text' },
    ]);
  }
}

function cleanFilename(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? '';
  const printable = [...base].filter((ch) => ch.charCodeAt(0) >= 0x20 && ch.charCodeAt(0) !== 0x7f).join('').trim();
  return (printable || 'controls.csv').slice(0, 200);
}

/**
 * Reads an uploaded control file and keeps it byte for byte (with its SHA-256) so every interval derived
 * from it can point back to it. A file that does not parse is refused whole and nothing is stored; the
 * same bytes uploaded twice are stored once.
 */
export async function storeControlFile(
  sequelize: Sequelize,
  actor: User,
  file: { originalname: string; buffer: Buffer } | undefined,
): Promise<ControlUploadDetail & { alreadyStored: boolean }> {
  if (!file) throw badInput({ file: 'Choose a CSV file to upload' }, 'No file was attached');
  if (file.buffer.length === 0) {
    throw fileRejected('The file is empty', [{ row: null, column: null, message: 'The file is empty' }]);
  }
  const data = parseControlCsv(decodeUtf8(file.buffer));
  const sha256 = createHash('sha256').update(file.buffer).digest('hex');
  const existing = await repo.findControlUploadBySha(sha256);
  if (existing) return { ...existing, data, alreadyStored: true };
  const filename = cleanFilename(file.originalname);
  const id = await writeTransaction(sequelize, async (transaction) => {
    const newId = await repo.insertControlUpload(
      { filename, mimeType: 'text/csv', content: file.buffer, sha256, uploadedById: actor.id },
      transaction,
    );
    await recordAudit(
      actor,
      {
        action: 'upload',
        entity: 'upload',
        entityId: newId,
        after: { kind: repo.CONTROLS_KIND, filename, sizeBytes: file.buffer.length, sha256, rows: data.rowCount },
      },
      transaction,
    );
    return newId;
  });
  const stored = await repo.findControlUpload(id);
  return { ...stored!.summary, data, alreadyStored: false };
}

export async function listControlFiles(): Promise<ControlUploadSummary[]> {
  return repo.listControlUploads();
}

async function loadControlFile(id: number) {
  const found = await repo.findControlUpload(id);
  if (!found) throw notFound('Control file', id);
  return found;
}

export async function getControlFile(id: number): Promise<ControlUploadDetail> {
  const found = await loadControlFile(id);
  return { ...found.summary, data: parseControlCsv(decodeUtf8(found.content)) };
}

/** The stored bytes, for download. */
export async function getControlFileContent(id: number): Promise<{ filename: string; content: Buffer }> {
  const found = await loadControlFile(id);
  return { filename: found.summary.filename, content: found.content };
}

// ---------------------------------------------------------------------------------------------
// Derivation from a stored control file

function normaliseUnit(unit: string): string {
  return unit.toLowerCase().replace(/\s+/g, '').replace(/[\u00b5\u03bc]/g, 'u');
}

const ACCEPTED_ACTIVITY_UNITS = new Set(['nmol/min/mg', 'nmol/min/mgprotein', 'nmol·min⁻¹·mg⁻¹'].map(normaliseUnit));

function inBand(age: number, band: { minYears: number; maxYears: number | null }): boolean {
  return age >= band.minYears && (band.maxYears === null || age < band.maxYears);
}

interface Selected {
  data: ControlDataUploadResult;
  summary: ControlUploadSummary;
  inBandValues: number[];
  restValues: number[];
  unit: string;
  unitWarning: string | null;
}

async function selectSeries(uploadId: number, s: ControlSelection): Promise<Selected> {
  const found = await loadControlFile(uploadId);
  const data = parseControlCsv(decodeUtf8(found.content));
  const series = data.series.find(
    (x) => x.specimenType === s.specimenType && x.assay === s.assay && x.measure === s.measure,
  );
  if (!series) {
    const what = s.measure === 'activity' ? `${s.assay} activity` : `${s.assay}/${s.measure === 'ratio_cs' ? 'CS' : 'CII'}`;
    throw badInput(
      { assay: `The file has no ${what} values for ${specimenTypeLabels[s.specimenType].toLowerCase()}` },
      `The control file has no ${what} values for ${specimenTypeLabels[s.specimenType].toLowerCase()}`,
    );
  }
  const inBandValues = series.points.filter((p) => inBand(p.ageYears, s.ageBand)).map((p) => p.value);
  const restValues = series.points.filter((p) => !inBand(p.ageYears, s.ageBand)).map((p) => p.value);
  let unit = 'ratio';
  let unitWarning: string | null = null;
  if (s.measure === 'activity') {
    unit = ACTIVITY_UNIT;
    if (data.unit === null) {
      unitWarning = `The file names no unit; the activities are taken to be in ${ACTIVITY_UNIT}.`;
    } else if (!ACCEPTED_ACTIVITY_UNITS.has(normaliseUnit(data.unit))) {
      throw badInput(
        { measure: `The file's unit "${data.unit}" is not ${ACTIVITY_UNIT}; convert the activities or use a ratio` },
        `The control file's activities are in "${data.unit}", not ${ACTIVITY_UNIT}`,
      );
    }
  }
  return { data, summary: found.summary, inBandValues, restValues, unit, unitWarning };
}

function computeInterval(s: ControlSelection, values: number[]): DeriveResult {
  try {
    return deriveInterval({
      method: s.method,
      outliers: s.outliers,
      values,
      pctLower: s.pctLower,
      pctUpper: s.pctUpper,
    });
  } catch (err) {
    if (err instanceof ReferenceStatsInputError) {
      const message = `${err.message} (${ageBandText(s.ageBand.minYears, s.ageBand.maxYears)} in this file)`;
      throw new AppError('VALIDATION_FAILED', message, { fields: { method: message } });
    }
    throw err;
  }
}

/** Harris & Boyd between the band and the rest of the series; an all-ages band is split at 16 years. */
function partitionFor(s: ControlSelection, sel: Selected, all: { age: number; value: number }[]) {
  let groups: [{ label: string; values: number[] }, { label: string; values: number[] }];
  let note: string | null = null;
  const { minYears, maxYears } = s.ageBand;
  if (minYears === 0 && maxYears === null) {
    const split = DEFAULT_SPLIT_AGE_YEARS;
    groups = [
      { label: `under ${split} y`, values: all.filter((p) => p.age < split).map((p) => p.value) },
      { label: `${split} y and over`, values: all.filter((p) => p.age >= split).map((p) => p.value) },
    ];
    note = `The band covers all ages, so children and adults (split at ${split} years) are compared.`;
  } else {
    groups = [
      { label: ageBandText(minYears, maxYears), values: sel.inBandValues },
      { label: 'other ages in the file', values: sel.restValues },
    ];
  }
  try {
    const screened = groups.map((g) => ({ label: g.label, values: screenOutliers(g.values, s.outliers).kept }));
    const result = checkPartition(
      summarizeGroup(screened[0]!.label, screened[0]!.values),
      summarizeGroup(screened[1]!.label, screened[1]!.values),
    );
    // Why the group counts need not add up to the values the interval uses: each group is screened on its own,
    // and the second group lies outside the chosen band.
    const counted = groups
      .map((g, i) => {
        const dropped = g.values.length - screened[i]!.values.length;
        return `${g.label}: ${screened[i]!.values.length} of ${g.values.length}${dropped ? ` (${dropped} set aside as outliers within the group)` : ''}`;
      })
      .join('; ');
    const why = `Each group is screened for outliers on its own before the comparison, so the counts (${counted}) need not match the values the interval itself uses, which are screened once, within the chosen band.`;
    return { partition: result, partitionNote: note ? `${note} ${why}` : why };
  } catch (err) {
    if (err instanceof ReferenceStatsInputError) {
      return { partition: null, partitionNote: `No partition check: ${err.message}.` };
    }
    throw err;
  }
}

/** Derives one interval from a stored control file without storing anything (the side-by-side view). */
export async function previewFromControls(uploadId: number, s: ControlSelection): Promise<ControlPreview> {
  const sel = await selectSeries(uploadId, s);
  const result = computeInterval(s, sel.inBandValues);
  if (sel.unitWarning) result.warnings.push(sel.unitWarning);
  const series = sel.data.series.find(
    (x) => x.specimenType === s.specimenType && x.assay === s.assay && x.measure === s.measure,
  )!;
  const partition = partitionFor(s, sel, series.points.map((p) => ({ age: p.ageYears, value: p.value })));
  return {
    result,
    values: [...sel.inBandValues].sort((a, b) => a - b),
    unit: sel.unit,
    ...partition,
  };
}

function listNumbers(values: number[]): string {
  const shown = values.slice(0, 20).map((v) => String(Math.round(v * 1e4) / 1e4));
  return values.length > 20 ? `${shown.join(', ')} and ${values.length - 20} more` : shown.join(', ');
}

/**
 * Stores a draft derived on the server from a stored control file, so the numbers, the file, the method
 * and the outlier rule recorded with the interval are exactly the ones that produced it.
 */
export async function createDraftFromControls(
  sequelize: Sequelize,
  actor: User,
  uploadId: number,
  body: DraftFromControlsBody,
): Promise<StoredInterval> {
  const sel = await selectSeries(uploadId, body);
  const result = computeInterval(body, sel.inBandValues);
  if (sel.unitWarning) result.warnings.push(sel.unitWarning);
  if (!(result.mean > 0)) {
    throw badInput({ measure: 'The mean of the control values is 0; results could not be expressed as % of it' });
  }
  const bandText = ageBandText(body.ageBand.minYears, body.ageBand.maxYears);
  const band = bandText === 'All ages' ? 'all ages' : bandText;
  const pct =
    body.method === 'pct_of_mean' ? ` (${body.pctLower ?? PCT_OF_MEAN_DEFAULTS.pctLower}–${body.pctUpper ?? PCT_OF_MEAN_DEFAULTS.pctUpper}% of the mean)` : '';
  const sourceNote = [
    `Derived from control file #${sel.summary.id} "${sel.summary.filename}" (SHA-256 ${sel.summary.sha256.slice(0, 16)}…):`,
    `${specimenTypeLabels[body.specimenType].toLowerCase()}, ${band}, ${result.n} of ${sel.inBandValues.length} values kept.`,
    `Method: ${methodDescriptions[body.method]}${pct}. Outliers: ${outlierDescriptions[body.outliers]}` +
      (result.excluded.length > 0 ? `; excluded ${listNumbers(result.excluded)}.` : '; none excluded.'),
    body.note ? body.note : '',
  ]
    .filter(Boolean)
    .join(' ');
  return writeTransaction(sequelize, (transaction) =>
    insertDraft(
      actor,
      {
        setName: body.setName,
        assay: body.assay,
        measure: body.measure,
        specimenType: body.specimenType,
        ageBand: body.ageBand,
        lower: result.lower,
        upper: result.upper,
        mean: result.mean,
        sd: result.sd,
        n: result.n,
        unit: sel.unit,
        method: body.method,
        sourceNote: sourceNote.slice(0, 2000),
        effectiveFrom: body.effectiveFrom,
        effectiveTo: body.effectiveTo,
        derivation: {
          outliers: body.outliers,
          excluded: result.excluded,
          lowerCi: result.lowerCi,
          upperCi: result.upperCi,
          warnings: result.warnings,
          pctLower: body.method === 'pct_of_mean' ? (body.pctLower ?? PCT_OF_MEAN_DEFAULTS.pctLower) : null,
          pctUpper: body.method === 'pct_of_mean' ? (body.pctUpper ?? PCT_OF_MEAN_DEFAULTS.pctUpper) : null,
        },
        uploadId: sel.summary.id,
      },
      transaction,
      { note: `Derived from control file #${sel.summary.id}` },
    ),
  );
}
