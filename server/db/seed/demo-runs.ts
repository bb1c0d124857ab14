import type { Sequelize } from 'sequelize';
import type { TracePoint } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { RunWell } from '@/schemas/run';
import { listWorkupSpecimens } from '../../modules/measurements/measurements.repository';
import { approveTarget, createMaterial, enterTarget } from '../../modules/qc/control-materials.service';
import { importRun, overrideRun } from '../../modules/runs/runs.service';
import { actor, backgroundSlope, PLATE, seeded, specificSlope, START, trace } from './demo-measurements';
import type { DemoCaseIds } from './demo-cases';

/*
 * Invented analytical runs of the fictitious Fernhollow laboratory: two levels of an in-house pooled muscle
 * homogenate (a fictitious material and lot) with director-entered targets for CS and CI, and a history of 22
 * daily runs whose control values wander within ±1.3 SD, except three runs made to show the evaluation:
 * run 12 with one control beyond 2 SD (a 1-2s warning), run 16 with one beyond 3 SD (1-3s, rejected) and run 19
 * with both CI levels above 2 SD (2-2s, rejected, then released by a director with a documented reason).
 * The last two runs also carry the cultured-fibroblast demo case's missing assays. Every number is made up.
 */

type Level = { key: 'L1' | 'L2'; level: string; targets: Record<'CS' | 'CI', { mean: number; sd: number }>; rows: Record<'CS' | 'CI', string> };

const LEVELS: Level[] = [
  { key: 'L1', level: 'Level 1 (normal pool)', targets: { CS: { mean: 124, sd: 6.2 }, CI: { mean: 31.5, sd: 2.1 } }, rows: { CS: 'A', CI: 'B' } },
  { key: 'L2', level: 'Level 2 (low pool)', targets: { CS: { mean: 58, sd: 3.4 }, CI: { mean: 11.8, sd: 0.95 } }, rows: { CS: 'C', CI: 'D' } },
];
const CONTROL_PROTEIN = 2.0;
const RUNS = 22;
const ASSAYS = ['CS', 'CI'] as const;

/** The z each control is made to read on run i (1-based): a slow wander, and the three teaching runs. */
function zFor(run: number, level: Level, assay: 'CS' | 'CI'): number {
  const special: Record<string, number> = {
    '12|L1|CI': 2.4,
    '16|L2|CS': -3.4,
    '19|L1|CI': 2.6,
    '19|L2|CI': 2.3,
  };
  const key = `${run}|${level.key}|${assay}`;
  if (key in special) return special[key]!;
  // Alternating in sign from one run to the next, so no 4-1s or 10x run builds up by accident.
  const phase = level.key === 'L1' ? 0.4 : 1.3;
  return 0.9 * Math.sin(run * 2.4 + phase + (assay === 'CI' ? 0.7 : 0));
}

/** The wells of one activity in duplicate: replicate 1 in columns 1–2, replicate 2 in 3–4 (total, background). */
function duplicateWells(
  row: string,
  assay: AssayCode,
  owner: { use: 'control'; controlMaterialId: number } | { use: 'specimen'; specimenId: number },
): RunWell[] {
  const hasBackground = backgroundSlope(assay, 1) !== null;
  return [1, 2].flatMap((replicate) => {
    const col = replicate === 1 ? 1 : 3;
    const total = { ...owner, well: `${row}${col}`, assay, role: 'total' as const, replicate };
    return hasBackground ? [total, { ...total, well: `${row}${col + 1}`, role: 'background' as const }] : [total];
  }) as RunWell[];
}

/** Readings of the duplicate wells of one activity (±0.6 % between replicates). */
function duplicateTraces(row: string, assay: AssayCode, activity: number, protein: number, random: () => number, columns: Map<string, TracePoint[]>): void {
  [activity * 1.006, activity * 0.994].forEach((value, i) => {
    const specific = specificSlope(assay, value, PLATE, protein);
    const bg = backgroundSlope(assay, specific);
    const col = i === 0 ? 1 : 3;
    columns.set(`${row}${col}`, trace(random, START[assay], specific + (bg ?? 0)));
    if (bg !== null) columns.set(`${row}${col + 1}`, trace(random, START[assay], bg));
  });
}

function plateText(run: number, columns: Map<string, TracePoint[]>): string {
  const wells = [...columns.keys()].sort();
  const times = columns.get(wells[0]!)!.map((p) => p.t);
  const lines = [
    '# Fernhollow Metabolic Laboratory (fictitious) - invented demo readings, not real measurements',
    `# plate_label: demo QC run ${run}`,
    '# temperature_c: 30',
    ['time_s', ...wells].join(','),
    ...times.map((t, i) => [String(t), ...wells.map((w) => columns.get(w)![i]!.a.toFixed(4))].join(',')),
  ];
  return `${lines.join('\n')}\n`;
}

export async function seedDemoRuns(sequelize: Sequelize, ids: Partial<DemoCaseIds>): Promise<void> {
  const tech = await actor('technologist@demo.test');
  const director = await actor('director@demo.test');
  const director2 = await actor('director2@demo.test');

  const materialIds = new Map<Level['key'], number>();
  for (const l of LEVELS) {
    const m = await createMaterial(sequelize, director, {
      name: 'Fernhollow pooled muscle homogenate (demo)',
      lot: 'FH-PMH-2609',
      level: l.level,
      expiresOn: '2027-09-30',
      description: 'Invented in-house control for the demo: aliquots of a pooled skeletal-muscle homogenate, kept at −80 °C.',
    });
    materialIds.set(l.key, m.id);
    for (const assay of ASSAYS) {
      const t = await enterTarget(sequelize, director, m.id, { assayCode: assay, ...l.targets[assay], note: 'Invented demo target.' });
      await approveTarget(sequelize, director2, t.id);
    }
  }

  // The fibroblast case (left in assay) gets its CIII and CII+III on the last two runs.
  const fibroblastSpecimen = ids.fibroblasts === undefined ? undefined : (await listWorkupSpecimens(ids.fibroblasts)).find((s) => s.accepted);
  const caseWork: Record<number, { assay: AssayCode; activity: number }> = {
    21: { assay: 'CIII', activity: 64.2 },
    22: { assay: 'CII+III', activity: 22.6 },
  };

  const random = seeded(20261001);
  for (let run = 1; run <= RUNS; run += 1) {
    const columns = new Map<string, TracePoint[]>();
    const wells: RunWell[] = [];
    for (const l of LEVELS) {
      for (const assay of ASSAYS) {
        const { mean, sd } = l.targets[assay];
        const row = l.rows[assay];
        wells.push(...duplicateWells(row, assay, { use: 'control', controlMaterialId: materialIds.get(l.key)! }));
        duplicateTraces(row, assay, mean + zFor(run, l, assay) * sd, CONTROL_PROTEIN, random, columns);
      }
    }
    const work = caseWork[run];
    if (work && fibroblastSpecimen?.proteinMgPerMl) {
      wells.push(...duplicateWells('E', work.assay, { use: 'specimen', specimenId: fibroblastSpecimen.id }));
      duplicateTraces('E', work.assay, work.activity, fibroblastSpecimen.proteinMgPerMl, random, columns);
    }
    wells.push({ use: 'blank', well: 'H12', note: 'Reagent blank' });
    columns.set('H12', trace(random, 0.052, 0.0002));
    const text = plateText(run, columns);
    const day = new Date(Date.UTC(2026, 9, 1 + run));
    const result = await importRun(
      sequelize,
      tech,
      { originalname: `demo-qc-run-${String(run).padStart(2, '0')}.csv`, mimetype: 'text/csv', size: Buffer.byteLength(text), buffer: Buffer.from(text, 'utf8') },
      {
        instrument: 'Plate reader 2 (demo)',
        startedAt: `${day.toISOString().slice(0, 10)}T09:30`,
        plateFormat: 96,
        wells,
        pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
        reactionVolumeUl: PLATE.reactionVolumeUl,
        sampleVolumeUl: PLATE.sampleVolumeUl,
        controlProteinMgPerMl: Object.fromEntries([...materialIds.values()].map((id) => [String(id), CONTROL_PROTEIN])),
        windows: {},
      },
    );
    if (run === 19) {
      await overrideRun(
        sequelize,
        director,
        result.run.id,
        {
          reason:
            'Both CI controls read high after a new NADH lot was opened; CS controls are in range and the repeat of both levels on the fresh lot was within 1 SD. Released after review.',
          password: '',
        },
        { checkPassword: false },
      );
    }
  }
}
