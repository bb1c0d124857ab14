import { createHash } from 'node:crypto';
import type { Sequelize, Transaction } from 'sequelize';
import type { AssayDefinition, CalculationResult } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import {
  plateGroupId,
  type PlateGroupPreview,
  type PlateImportPlan,
  type PlateImportResult,
  type PlatePreview,
  type PlateReplicateSummary,
  type StoredInputs,
  type WorkupSpecimen,
} from '@/schemas/measurement';
import { describePlateIssue, type MappedTraceGroup, type PlateMapEntry } from '@/schemas/plate';
import type { User } from '@/schemas/user';
import { pathlengthFromFill } from '../../domain/assay-engine/activity';
import { summariseReplicates } from '../../domain/assay-engine/replicates';
import { importPlateFile } from '../../domain/plate-import/apply-map';
import { badInput, notFound } from '../../lib/errors';
import { getCurrentDefinition } from '../assay-definitions/assay-definitions.service';
import { recordAudit } from '../audit/audit.service';
import { writeTransaction } from '../../db/write-transaction';
import { auditSummary, computeFromInputs } from '../measurements/compute';
import * as measurementsRepo from '../measurements/measurements.repository';
import { alreadySaved, loadEditableCase, startAssayIfReceived } from '../measurements/measurements.service';
import { findPlateMapById } from '../plate-maps/plate-maps.repository';
import * as repo from './uploads.repository';

/** The uploaded file as multer hands it over. */
export type IncomingFile = { originalname: string; mimetype: string; size: number; buffer: Buffer };

type PreparedGroup = {
  preview: PlateGroupPreview;
  inputs: StoredInputs & { mode: 'plate' };
  definitionId: number;
  definitionVersion: number;
};

type Prepared = { preview: PlatePreview; groups: PreparedGroup[]; mapName: string | null };

/** Specimen of the case for each label used by the map: chosen on the screen, else the specimen of that label. */
function bindSpecimens(
  refs: string[],
  plan: PlateImportPlan,
  specimens: (WorkupSpecimen & { caseId: number })[],
): Map<string, WorkupSpecimen & { proteinMgPerMl: number }> {
  const accepted = specimens.filter((s) => s.accepted);
  const bound = new Map<string, WorkupSpecimen & { proteinMgPerMl: number }>();
  const problems: Record<string, string> = {};
  for (const ref of refs) {
    const field = `plan.specimens.${ref}`;
    const chosenId = plan.specimens[ref];
    const s =
      chosenId !== undefined
        ? specimens.find((x) => x.id === chosenId)
        : (specimens.find((x) => x.label.toLowerCase() === ref.toLowerCase()) ??
          (refs.length === 1 && accepted.length === 1 ? accepted[0] : undefined));
    if (!s) {
      problems[field] =
        chosenId !== undefined
          ? `Specimen ${chosenId} is not a specimen of this case`
          : `Choose which specimen of the case the plate map's label "${ref}" stands for`;
      continue;
    }
    if (!s.accepted) {
      problems[field] = `Specimen ${s.label} (label "${ref}" in the map) was rejected on receipt; no assays are recorded on it`;
      continue;
    }
    if (s.proteinMgPerMl === null) {
      problems[field] = `Record the protein concentration of specimen ${s.label} (label "${ref}" in the map) before importing its wells`;
      continue;
    }
    bound.set(ref, { ...s, proteinMgPerMl: s.proteinMgPerMl });
  }
  if (Object.keys(problems).length) throw badInput(problems, Object.values(problems)[0]);
  return bound;
}

export function pathlengthOf(plan: Pick<PlateImportPlan, 'pathlength'>): number {
  return plan.pathlength.mode === 'given' ? plan.pathlength.cm : pathlengthFromFill(plan.pathlength.volumeUl, plan.pathlength.wellAreaCm2);
}

type SummarisedGroup = { specimenId: number; specimenLabel: string; assay: AssayCode; result: { activity: number | null } };

/** Replicate mean, SD and CV of each specimen × assay among the groups, in first-appearance order. */
export function summariseSpecimenAssays<G extends SummarisedGroup>(
  groups: G[],
  cvLimitPct: (assay: AssayCode) => number,
): { first: G; summary: PlateReplicateSummary }[] {
  const bySpecimenAssay = new Map<string, G[]>();
  for (const g of groups) {
    const key = `${g.specimenId}|${g.assay}`;
    bySpecimenAssay.set(key, [...(bySpecimenAssay.get(key) ?? []), g]);
  }
  return [...bySpecimenAssay.values()].map((gs) => {
    const first = gs[0]!;
    const summary = summariseReplicates(gs.map((g) => g.result.activity), cvLimitPct(first.assay));
    return { first, summary: { specimenId: first.specimenId, specimenLabel: first.specimenLabel, assay: first.assay, ...summary } };
  });
}

/** Parses, maps and computes the whole file; throws PlateImportError (400 FILE_REJECTED) on a bad file. */
async function preparePlate(caseId: number, file: IncomingFile, plan: PlateImportPlan, transaction?: Transaction): Promise<Prepared> {
  await loadEditableCase(caseId, transaction);
  let wells: PlateMapEntry[];
  let mapName: string | null = null;
  if (plan.plateMapId !== null) {
    const map = await findPlateMapById(plan.plateMapId, transaction);
    if (!map) throw badInput({ 'plan.plateMapId': `Plate map ${plan.plateMapId} does not exist` });
    wells = map.wells;
    mapName = map.name;
  } else {
    wells = plan.wells!;
  }
  const { parsed, mapped } = importPlateFile(file.buffer, { name: mapName ?? 'Plate map', wells });

  const specimens = await measurementsRepo.listWorkupSpecimens(caseId, transaction);
  const refs = [...new Set(mapped.groups.map((g) => g.specimenRef))];
  const bound = bindSpecimens(refs, plan, specimens);
  const saved = await measurementsRepo.savedKeys([...bound.values()].map((s) => s.id), transaction);
  const pathlengthCm = pathlengthOf(plan);

  const definitions = new Map<AssayCode, { id: number; definition: AssayDefinition }>();
  for (const assay of new Set(mapped.groups.map((g) => g.assay))) {
    const d = await getCurrentDefinition(assay);
    definitions.set(assay, { id: d.id, definition: d.definition });
  }

  const groups: PreparedGroup[] = mapped.groups.map((g: MappedTraceGroup) => {
    const s = bound.get(g.specimenRef)!;
    const d = definitions.get(g.assay)!;
    const id = plateGroupId(g);
    const inputs: StoredInputs & { mode: 'plate' } = {
      mode: 'plate',
      pathlengthCm,
      reactionVolumeUl: plan.reactionVolumeUl,
      sampleVolumeUl: plan.sampleVolumeUl,
      proteinMgPerMl: s.proteinMgPerMl,
      uploadId: 0,
      filename: file.originalname,
      specimenRef: g.specimenRef,
      wells: { total: g.wells.total, background: g.wells.background ?? null, blank: g.wells.blank ?? null },
      total: g.total,
      background: g.background ?? null,
      blank: g.blank ?? null,
      window: plan.windows[id] ?? null,
    };
    const result: CalculationResult = computeFromInputs(inputs, d.definition);
    return {
      inputs,
      definitionId: d.id,
      definitionVersion: d.definition.version,
      preview: {
        id,
        specimenRef: g.specimenRef,
        specimenId: s.id,
        specimenLabel: s.label,
        assay: g.assay,
        replicate: g.replicate,
        wells: inputs.wells,
        total: g.total,
        background: inputs.background,
        blank: inputs.blank,
        result,
        alreadySaved: saved.has(`${s.id}|${g.assay}|${g.replicate}`),
      },
    };
  });

  const summaries = summariseSpecimenAssays(
    groups.map((g) => g.preview),
    (assay) => definitions.get(assay)!.definition.cvLimitPct,
  ).map(({ summary }) => summary);

  const sha256 = createHash('sha256').update(file.buffer).digest('hex');
  return {
    mapName,
    groups,
    preview: {
      filename: file.originalname,
      sizeBytes: file.buffer.byteLength,
      sha256,
      wavelengthNm: parsed.wavelengthNm,
      metadata: parsed.metadata,
      pathlengthCm,
      warnings: mapped.warnings.map((w) => ({ row: w.row, column: w.column, message: describePlateIssue(w) })),
      groups: groups.map((g) => g.preview),
      summaries,
    },
  };
}

/** What the file would give with this plan, windows included; stores nothing. */
export async function previewPlateImport(caseId: number, file: IncomingFile, plan: PlateImportPlan): Promise<PlatePreview> {
  return (await preparePlate(caseId, file, plan)).preview;
}

/**
 * Keeps the file and saves one measurement per well group, with their audit events, in one transaction:
 * if any group cannot be saved (e.g. its replicate is already saved), nothing is kept.
 */
export async function importPlate(
  sequelize: Sequelize,
  actor: User,
  caseId: number,
  file: IncomingFile,
  plan: PlateImportPlan,
): Promise<PlateImportResult> {
  return writeTransaction(sequelize, async (t) => {
    const prepared = await preparePlate(caseId, file, plan, t);
    const uploadId = await repo.insertUpload(
      {
        caseId,
        kind: repo.PLATE_UPLOAD_KIND,
        filename: file.originalname.slice(0, 255),
        mimeType: (file.mimetype || 'text/csv').slice(0, 100),
        content: file.buffer,
        sha256: prepared.preview.sha256,
        uploadedById: actor.id,
      },
      t,
    );
    await recordAudit(
      actor,
      {
        action: 'upload',
        entity: 'upload',
        entityId: uploadId,
        caseId,
        after: {
          filename: file.originalname,
          sizeBytes: file.buffer.byteLength,
          sha256: prepared.preview.sha256,
          plateMap: prepared.mapName,
          groups: prepared.groups.length,
        },
      },
      t,
    );
    const measurementIds: number[] = [];
    for (const g of prepared.groups) {
      measurementIds.push(await savePlateGroup(actor, { ...g.preview, caseId, label: g.preview.specimenLabel }, g, uploadId, null, t));
    }
    await startAssayIfReceived(sequelize, actor, caseId, t);
    const upload = (await repo.findUploadSummary(uploadId, t))!;
    return { upload, measurementIds };
  });
}

/**
 * Saves one well group as a plate measurement, with its audit event. The clash with a saved replicate is checked
 * here, group by group, so a clash part-way through rolls back the file and the groups before it. `label` names
 * the specimen in the 409; `run` is the analytical run the group was read on, if any.
 */
export async function savePlateGroup(
  actor: User,
  p: { id: string; caseId: number; specimenId: number; label: string; assay: AssayCode; replicate: number; result: CalculationResult },
  g: { inputs: StoredInputs & { mode: 'plate' }; definitionId: number; definitionVersion: number },
  uploadId: number,
  run: { id: number; runNumber: string } | null,
  t: Transaction,
): Promise<number> {
  if (await measurementsRepo.findMeasurementByKey(p.specimenId, p.assay, p.replicate, t)) {
    throw alreadySaved(p.label, p.assay, p.replicate, `groups.${p.id}`);
  }
  const m = await measurementsRepo.insertMeasurement(
    {
      caseId: p.caseId,
      specimenId: p.specimenId,
      assay: p.assay,
      replicate: p.replicate,
      inputs: { ...g.inputs, uploadId },
      result: p.result,
      definitionId: g.definitionId,
      definitionVersion: g.definitionVersion,
      uploadId,
      createdById: actor.id,
      runId: run?.id ?? null,
    },
    t,
  );
  const after = run ? { ...auditSummary(m), runNumber: run.runNumber } : auditSummary(m);
  await recordAudit(actor, { action: 'create', entity: 'measurement', entityId: m.id, caseId: p.caseId, after }, t);
  return m.id;
}

export async function getUploadFile(id: number): Promise<{ filename: string; mimeType: string; sha256: string; content: Buffer }> {
  const found = await repo.findUploadContent(id);
  if (!found) throw notFound('Upload', id);
  return { filename: found.summary.filename, mimeType: found.summary.mimeType, sha256: found.summary.sha256, content: found.content };
}

export const listUploadsOfCase = repo.listUploadsOfCase;
