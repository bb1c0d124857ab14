import { createHash } from 'node:crypto';
import type { Sequelize, Transaction } from 'sequelize';
import type { AssayDefinition } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { StoredInputs, WorkupSpecimen } from '@/schemas/measurement';
import { describePlateIssue, type PlateMapEntry } from '@/schemas/plate';
import {
  runGroupId,
  runWellOwner,
  type OpenSpecimenList,
  type RunControlResult,
  type RunDetail,
  type RunGroupPreview,
  type RunGroupWell,
  type RunImportResult,
  type RunList,
  type RunListQuery,
  type RunOverrideInput,
  type RunPlan,
  type RunPreview,
  type RunSummary,
  type RunViolation,
} from '@/schemas/run';
import type { User } from '@/schemas/user';
import { mapCheckedEntries } from '../../domain/plate-import/apply-map';
import { parsePlateFile } from '../../domain/plate-import/parse-plate';
import { writeTransaction } from '../../db/write-transaction';
import { badInput, conflict, invalidState, notFound } from '../../lib/errors';
import { getCurrentDefinition } from '../assay-definitions/assay-definitions.service';
import { recordAudit } from '../audit/audit.service';
import { findCaseById, type CaseRecord } from '../cases/cases.repository';
import { labTimeZone } from '../cases/lab-zone';
import { labYear, parseLabDateTime } from '../cases/lab-time';
import { computeFromInputs } from '../measurements/compute';
import * as measurementsRepo from '../measurements/measurements.repository';
import {
  alreadySaved,
  loadEditableCase,
  measurementEditableStates,
  startAssayIfReceived,
} from '../measurements/measurements.service';
import { evaluateRunControls, type RunControlEvaluation } from '../qc/run-evaluation';
import { confirmSigner } from '../reports/report-signing.service';
import { pathlengthOf, savePlateGroup, summariseSpecimenAssays, type IncomingFile } from '../uploads/plate-import.service';
import { findUploadSummary, insertUpload } from '../uploads/uploads.repository';
import { blockingStatuses } from './run-release';
import * as repo from './runs.repository';

/*
 * Analytical runs: a plate carrying specimens of several open cases and control materials, read in one file.
 * The preview computes everything and stores nothing; the import stores the run, the file, every case's
 * measurements and every control result in one write transaction, so a single bad group keeps nothing.
 */

type Definition = { id: number; definition: AssayDefinition };

type PreparedGroup = {
  preview: RunGroupPreview;
  inputs: StoredInputs & { mode: 'plate' };
  definitionId: number;
  definitionVersion: number;
};

type PreparedControl = RunControlResult & { groupsOf: PreparedGroup[] };

type PreparedRun = {
  preview: RunPreview;
  startedAt: Date;
  specimenGroups: PreparedGroup[];
  controls: PreparedControl[];
  cases: Map<number, CaseRecord>;
  definitions: Map<AssayCode, Definition>;
  evaluation: RunControlEvaluation;
  violations: RunViolation[];
};

/** The plan's field that names a layout entry, for 400 answers. */
function wellField(plan: RunPlan, test: (w: RunGroupWell) => boolean, field: string): string {
  const i = plan.wells.findIndex((w) => w.use !== 'blank' && test(w));
  return `plan.wells.${i}.${field}`;
}

async function startOf(plan: RunPlan): Promise<Date> {
  const at = parseLabDateTime(plan.startedAt, await labTimeZone());
  if (!at) throw badInput({ 'plan.startedAt': 'Start of the run: use a real date and time, e.g. 2026-03-04T09:30' });
  if (at.getTime() > Date.now() + 5 * 60_000) throw badInput({ 'plan.startedAt': 'Start of the run cannot be in the future' });
  return at;
}

/** Each specimen on the plate: it exists, was accepted, has its protein, and its case is open to assay work. */
async function bindSpecimens(plan: RunPlan, transaction?: Transaction) {
  const ids = [...new Set(plan.wells.flatMap((w) => (w.use === 'specimen' ? [w.specimenId] : [])))];
  const specimens = new Map<number, WorkupSpecimen & { caseId: number; proteinMgPerMl: number }>();
  const cases = new Map<number, CaseRecord>();
  for (const id of ids) {
    const field = wellField(plan, (w) => w.use === 'specimen' && w.specimenId === id, 'specimenId');
    const s = await measurementsRepo.findWorkupSpecimen(id, transaction);
    if (!s) throw badInput({ [field]: `Specimen ${id} does not exist` });
    const c = cases.get(s.caseId) ?? (await findCaseById(s.caseId, transaction));
    if (!c) throw notFound('Case', s.caseId);
    cases.set(c.id, c);
    // A closed case (awaiting review, signed, cancelled) takes no new results: 409 naming the case.
    await loadEditableCase(c.id, transaction);
    if (!s.accepted) throw badInput({ [field]: `Specimen ${s.label} of case ${c.accession} was rejected on receipt; no assays are recorded on it` });
    if (s.proteinMgPerMl === null) {
      throw badInput({ [field]: `Record the protein concentration of specimen ${s.label} of case ${c.accession} before importing its wells` });
    }
    specimens.set(id, { ...s, proteinMgPerMl: s.proteinMgPerMl });
  }
  return { specimens, cases };
}

/** Each control material on the plate: it exists, is not retired or expired, and its protein is given. */
async function bindControls(plan: RunPlan, startedAt: Date, transaction?: Transaction) {
  const ids = [...new Set(plan.wells.flatMap((w) => (w.use === 'control' ? [w.controlMaterialId] : [])))];
  const rows = await repo.controlMaterialRows(ids, transaction);
  const bound = new Map<number, { label: string; material: string; lot: string; level: string; proteinMgPerMl: number }>();
  for (const id of ids) {
    const field = wellField(plan, (w) => w.use === 'control' && w.controlMaterialId === id, 'controlMaterialId');
    const m = rows.get(id);
    if (!m) throw badInput({ [field]: `Control material ${id} does not exist` });
    const label = `${m.name} ${m.level} (lot ${m.lot})`;
    if (m.retiredAt) throw badInput({ [field]: `Control material ${label} is retired; no new runs may use it` });
    if (m.expiresOn < startedAt.toISOString().slice(0, 10)) {
      throw badInput({ [field]: `Control material ${label} expired on ${m.expiresOn}, before this run started` });
    }
    const protein = plan.controlProteinMgPerMl[String(id)];
    if (protein === undefined) {
      throw badInput({ [`plan.controlProteinMgPerMl.${id}`]: `Give the protein concentration of control ${label} (mg/mL)` });
    }
    bound.set(id, { label, material: m.name, lot: m.lot, level: m.level, proteinMgPerMl: protein });
  }
  return bound;
}

function mean(values: number[]): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

/** Parses the file for the plate's format, maps the layout, computes every group and judges the controls. */
async function prepareRun(file: IncomingFile, plan: RunPlan, transaction?: Transaction): Promise<PreparedRun> {
  const startedAt = await startOf(plan);
  const parsed = parsePlateFile(file.buffer, plan.plateFormat);
  const groupWells = plan.wells.filter((w): w is RunGroupWell => w.use !== 'blank');
  const entries: PlateMapEntry[] = groupWells.map((w) => ({
    well: w.well,
    specimenRef: runWellOwner(w),
    assay: w.assay,
    role: w.role,
    replicate: w.replicate,
  }));
  const mapped = mapCheckedEntries(parsed, entries);
  const plateBlanks = new Set(plan.wells.flatMap((w) => (w.use === 'blank' ? [w.well] : [])));

  const { specimens, cases } = await bindSpecimens(plan, transaction);
  const controls = await bindControls(plan, startedAt, transaction);
  const saved = await measurementsRepo.savedKeys([...specimens.keys()], transaction);
  const pathlengthCm = pathlengthOf(plan);
  const definitions = new Map<AssayCode, Definition>();
  for (const assay of new Set(mapped.groups.map((g) => g.assay))) {
    const d = await getCurrentDefinition(assay);
    definitions.set(assay, { id: d.id, definition: d.definition });
  }

  const groups: PreparedGroup[] = mapped.groups.map((g) => {
    const [kind, rawId] = g.specimenRef.split(':') as ['specimen' | 'control', string];
    const ownerId = Number(rawId);
    const specimen = kind === 'specimen' ? specimens.get(ownerId)! : null;
    const control = kind === 'control' ? controls.get(ownerId)! : null;
    const c = specimen ? cases.get(specimen.caseId)! : null;
    const d = definitions.get(g.assay)!;
    const id =
      kind === 'specimen'
        ? runGroupId({ use: 'specimen', specimenId: ownerId, assay: g.assay, replicate: g.replicate })
        : runGroupId({ use: 'control', controlMaterialId: ownerId, assay: g.assay, replicate: g.replicate });
    const inputs: StoredInputs & { mode: 'plate' } = {
      mode: 'plate',
      pathlengthCm,
      reactionVolumeUl: plan.reactionVolumeUl,
      sampleVolumeUl: plan.sampleVolumeUl,
      proteinMgPerMl: specimen ? specimen.proteinMgPerMl : control!.proteinMgPerMl,
      uploadId: 0,
      filename: file.originalname,
      specimenRef: specimen ? specimen.label : control!.label,
      wells: { total: g.wells.total, background: g.wells.background ?? null, blank: g.wells.blank ?? null },
      total: g.total,
      background: g.background ?? null,
      blank: g.blank ?? null,
      window: plan.windows[id] ?? null,
    };
    const result = computeFromInputs(inputs, d.definition);
    return {
      inputs,
      definitionId: d.id,
      definitionVersion: d.definition.version,
      preview: {
        id,
        use: kind,
        assay: g.assay,
        replicate: g.replicate,
        specimenId: specimen?.id ?? null,
        specimenLabel: specimen?.label ?? null,
        caseId: c?.id ?? null,
        accession: c?.accession ?? null,
        controlMaterialId: control ? ownerId : null,
        controlLabel: control?.label ?? null,
        wells: inputs.wells,
        total: g.total,
        background: inputs.background,
        blank: inputs.blank,
        result,
        alreadySaved: specimen ? saved.has(`${specimen.id}|${g.assay}|${g.replicate}`) : false,
      },
    };
  });
  const specimenGroups = groups.filter((g) => g.preview.use === 'specimen');

  // One control result per material × assay: the mean of its replicate groups' activities.
  const byControl = new Map<string, PreparedGroup[]>();
  for (const g of groups.filter((x) => x.preview.use === 'control')) {
    const key = `${g.preview.controlMaterialId}|${g.preview.assay}`;
    byControl.set(key, [...(byControl.get(key) ?? []), g]);
  }
  const controlResults: PreparedControl[] = [...byControl.values()].map((gs) => {
    const first = gs[0]!.preview;
    const m = controls.get(first.controlMaterialId!)!;
    const activities = gs.map((g) => g.preview.result.activity);
    return {
      controlMaterialId: first.controlMaterialId!,
      material: m.material,
      lot: m.lot,
      level: m.level,
      assay: first.assay,
      value: activities.every((a): a is number => a !== null) ? mean(activities) : null,
      unit: first.result.unit,
      groups: gs.map((g) => ({ id: g.preview.id, replicate: g.preview.replicate, activity: g.preview.result.activity })),
      target: null,
      z: null,
      groupsOf: gs,
    };
  });
  const judged = controlResults.filter((c) => c.value !== null);
  const evaluation = await evaluateRunControls(
    { runId: null, startedAt, results: judged.map((c) => ({ controlMaterialId: c.controlMaterialId, assayCode: c.assay, value: c.value! })) },
    transaction,
  );
  const targets = await repo.targetsById(evaluation.perResult.flatMap((p) => (p.controlTargetId === null ? [] : [p.controlTargetId])), transaction);
  evaluation.perResult.forEach((p, i) => {
    const c = judged[i]!;
    const t = p.controlTargetId === null ? undefined : targets.get(p.controlTargetId);
    c.target = t ? { id: t.id, mean: t.mean, sd: t.sd } : null;
    c.z = p.z;
  });

  const summaries = summariseSpecimenAssays(
    specimenGroups.map((g) => ({ ...g.preview, specimenId: g.preview.specimenId!, specimenLabel: g.preview.specimenLabel! })),
    (assay) => definitions.get(assay)!.definition.cvLimitPct,
  ).map(({ first, summary }) => ({ ...summary, caseId: first.caseId!, accession: first.accession! }));

  // The evaluation was given this run's assay codes, so its violations carry them back.
  const violations = evaluation.violations.map((v) => ({ ...v, assayCode: v.assayCode as AssayCode }));
  return {
    startedAt,
    violations,
    specimenGroups,
    controls: controlResults,
    cases,
    definitions,
    evaluation,
    preview: {
      filename: file.originalname,
      sizeBytes: file.buffer.byteLength,
      sha256: createHash('sha256').update(file.buffer).digest('hex'),
      plateFormat: plan.plateFormat,
      wavelengthNm: parsed.wavelengthNm,
      metadata: parsed.metadata,
      pathlengthCm,
      warnings: mapped.warnings
        .filter((w) => !(w.column !== null && plateBlanks.has(w.column)))
        .map((w) => ({ row: w.row, column: w.column, message: describePlateIssue(w) })),
      groups: groups.map((g) => g.preview),
      summaries,
      controls: controlResults.map(({ groupsOf: _groups, ...c }) => c),
      qc: { status: evaluation.status, violations },
    },
  };
}

/** What the file gives with this plan, windows and provisional QC included; stores nothing. */
export async function previewRun(file: IncomingFile, plan: RunPlan): Promise<RunPreview> {
  return (await prepareRun(file, plan)).preview;
}

/**
 * Keeps the file, the run, every case's measurements (runId set) and every control result with its z and the
 * run's QC status, in one write transaction: anything refused (a replicate already saved, a closed case, a
 * control without an activity, the same file imported before) keeps nothing.
 */
export async function importRun(sequelize: Sequelize, actor: User, file: IncomingFile, plan: RunPlan): Promise<RunImportResult> {
  return writeTransaction(sequelize, async (t) => {
    const sha256 = createHash('sha256').update(file.buffer).digest('hex');
    const earlier = await repo.findRunByFileSha(sha256, t);
    if (earlier) throw conflict(`This plate file was already imported as run ${earlier.runNumber}; nothing was saved again`);
    const prepared = await prepareRun(file, plan, t);
    for (const g of prepared.specimenGroups) {
      const p = g.preview;
      if (p.alreadySaved) {
        const e = alreadySaved(`${p.specimenLabel} of case ${p.accession}`, p.assay, p.replicate, `groups.${p.id}`);
        throw e;
      }
    }
    for (const c of prepared.controls) {
      if (c.value === null) {
        const bad = c.groups.filter((g) => g.activity === null).map((g) => g.id);
        throw badInput(
          Object.fromEntries(bad.map((id) => [`groups.${id}`, 'No activity: move its window or leave the well out'])),
          `Control ${c.material} ${c.level} (lot ${c.lot}) ${c.assay} has a replicate without an activity (${bad.join(', ')}); nothing was saved`,
        );
      }
    }
    const uploadId = await insertUpload(
      {
        caseId: null,
        kind: repo.RUN_UPLOAD_KIND,
        filename: file.originalname.slice(0, 255),
        mimeType: (file.mimetype || 'text/csv').slice(0, 100),
        content: file.buffer,
        sha256,
        uploadedById: actor.id,
      },
      t,
    );
    const zone = await labTimeZone();
    const definitionVersions = Object.fromEntries([...prepared.definitions].map(([a, d]) => [a, d.definition.version]));
    const run = await repo.insertRun(
      {
        runNumber: await repo.nextRunNumber(labYear(prepared.startedAt, zone), t),
        instrument: plan.instrument,
        startedAt: prepared.startedAt,
        operatorId: actor.id,
        plateFormat: plan.plateFormat,
        wells: plan.wells,
        pathlengthCm: prepared.preview.pathlengthCm,
        definitionVersions,
        uploadId,
        qcStatus: prepared.evaluation.status,
        violations: prepared.violations,
      },
      t,
    );
    const controlResultIds: number[] = [];
    for (const c of prepared.controls) {
      controlResultIds.push(
        await repo.insertControlResult(
          {
            runId: run.id,
            controlMaterialId: c.controlMaterialId,
            assayCode: c.assay,
            value: c.value!,
            wells: c.groupsOf.map((g) => ({ id: g.preview.id, wells: g.preview.wells, activity: g.preview.result.activity })),
            controlTargetId: c.target?.id ?? null,
            z: c.z,
            measuredAt: prepared.startedAt,
          },
          t,
        ),
      );
    }
    await recordAudit(
      actor,
      {
        action: 'create',
        entity: 'run',
        entityId: run.id,
        after: {
          runNumber: run.runNumber,
          instrument: run.instrument,
          startedAt: prepared.startedAt.toISOString(),
          plateFormat: plan.plateFormat,
          file: { uploadId, filename: file.originalname, sha256 },
          qcStatus: prepared.evaluation.status,
          violations: prepared.violations,
          controls: prepared.controls.map((c) => ({ controlMaterialId: c.controlMaterialId, assay: c.assay, value: c.value, z: c.z })),
          cases: [...prepared.cases.values()].map((c) => c.accession),
        },
      },
      t,
    );
    const measurementIds: number[] = [];
    for (const g of prepared.specimenGroups) {
      const p = g.preview;
      // Checked again group by group: a clash part-way through rolls back the run, the file and every group before it.
      const at = { ...p, caseId: p.caseId!, specimenId: p.specimenId!, label: `${p.specimenLabel} of case ${p.accession}` };
      measurementIds.push(await savePlateGroup(actor, at, g, uploadId, run, t));
    }
    for (const caseId of prepared.cases.keys()) await startAssayIfReceived(sequelize, actor, caseId, t);
    const [summary] = await repo.toSummaries([run], t);
    return { run: summary!, upload: (await findUploadSummary(uploadId, t))!, measurementIds, controlResultIds };
  });
}

export async function listRuns(q: RunListQuery): Promise<RunList> {
  const page = q.page ?? 1;
  const pageSize = q.pageSize ?? 50;
  const { rows, total } = await repo.listRuns({ page, pageSize, status: q.status, text: q.q });
  return { items: await repo.toSummaries(rows), total };
}

export async function getRun(id: number): Promise<RunDetail> {
  const row = await repo.findRunRow(id);
  if (!row) throw notFound('Run', id);
  const [summary] = await repo.toSummaries([row]);
  const layout = repo.layoutOf(row);
  const results = await repo.controlResultsOfRun(id);
  const materials = await repo.controlMaterialRows(results.map((r) => r.controlMaterialId));
  const targets = await repo.targetsById(results.flatMap((r) => (r.controlTargetId === null ? [] : [r.controlTargetId])));
  const controls: RunControlResult[] = results.map((r) => {
    const m = materials.get(r.controlMaterialId);
    const t = r.controlTargetId === null ? undefined : targets.get(r.controlTargetId);
    const wells = JSON.parse(r.wells) as { id: string; activity: number | null }[];
    return {
      controlMaterialId: r.controlMaterialId,
      material: m?.name ?? '',
      lot: m?.lot ?? '',
      level: m?.level ?? '',
      assay: r.assayCode as AssayCode,
      value: r.value,
      unit: 'nmol/min/mg protein',
      groups: wells.map((w) => ({ id: w.id, replicate: Number(w.id.split('|')[2]), activity: w.activity })),
      target: t ? { id: t.id, mean: t.mean, sd: t.sd } : null,
      z: r.z,
    };
  });
  return {
    ...summary!,
    wells: layout.wells,
    pathlengthCm: layout.pathlengthCm,
    definitionVersions: JSON.parse(row.definitionVersions) as Record<string, number>,
    upload: row.uploadId === null ? null : await findUploadSummary(row.uploadId),
    controls,
    measurements: await repo.measurementsOfRun(id),
    version: row.version,
  };
}

export async function listOpenSpecimens(): Promise<OpenSpecimenList> {
  return { items: await repo.openSpecimens(measurementEditableStates) };
}


/**
 * A director releases a run whose controls were rejected (or not evaluated): the password is typed again and
 * checked as for a signature, the reason is kept on the run, printed in the report and recorded in the trail.
 */
export async function overrideRun(
  sequelize: Sequelize,
  actor: User,
  id: number,
  input: RunOverrideInput,
  /** The demo seed releases without a typed password; the HTTP route always checks it. */
  opts: { checkPassword?: boolean } = {},
): Promise<RunSummary> {
  const existing = await repo.findRunRow(id);
  if (!existing) throw notFound('Run', id);
  await confirmSigner(sequelize, actor, input.password, opts.checkPassword ?? true);
  return writeTransaction(sequelize, async (t) => {
    const run = await repo.findRunRow(id, t);
    if (!run) throw notFound('Run', id);
    if (run.overrideAt) throw invalidState(`Run ${run.runNumber} was already released by a director`);
    if (!blockingStatuses.has(run.qcStatus)) {
      throw invalidState(`Run ${run.runNumber}'s controls were accepted; there is nothing to release`);
    }
    const at = new Date();
    if (!(await repo.setOverrideIfVersion(run.id, run.version, { reason: input.reason, byId: actor.id, at }, t))) {
      throw conflict(`Run ${run.runNumber} was changed by someone else; reload it`);
    }
    await recordAudit(
      actor,
      {
        action: 'override',
        entity: 'run',
        entityId: run.id,
        before: { qcStatus: run.qcStatus, override: null },
        after: { qcStatus: run.qcStatus, override: { reason: input.reason, at: at.toISOString() } },
        note: input.reason,
      },
      t,
    );
    const fresh = (await repo.findRunRow(id, t))!;
    return (await repo.toSummaries([fresh], t))[0]!;
  });
}
