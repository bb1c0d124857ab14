import type { Sequelize } from 'sequelize';
import { defaultAssayDefinitions, type TracePoint } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import type { CreateMeasurementInput } from '@/schemas/measurement';
import type { PlateMapEntry } from '@/schemas/plate';
import type { User } from '@/schemas/user';
import { findCaseById } from '../../modules/cases/cases.repository';
import { listWorkupSpecimens } from '../../modules/measurements/measurements.repository';
import { createMeasurement } from '../../modules/measurements/measurements.service';
import { saveSpecimenProtein } from '../../modules/measurements/protein.service';
import { createPlateMap } from '../../modules/plate-maps/plate-maps.service';
import { submitCaseForReview } from '../../modules/results/results.service';
import { importPlate } from '../../modules/uploads/plate-import.service';
import { findUserByEmail, publicUser } from '../../modules/users/users.repository';
import type { DemoCaseIds, DemoCaseName } from './demo-cases';

/*
 * Invented assay results for the demo cases of the fictitious Fernhollow laboratory, one deficiency pattern
 * per case, entered the three ways the bench enters them (a plate file, pasted readings, typed rates) and
 * submitted for review, except the cultured-fibroblast case, which stays in assay. Every number is made up,
 * chosen only to land on the intended side of the invented demo intervals; the generator is seeded, so the
 * demo is the same on every machine.
 */

type Activities = Partial<Record<AssayCode, [number, number]>>;
type Plan = {
  mode: 'plate' | 'traces' | 'rates';
  protein: { kind: 'curve'; absorbance: number; dilution: number } | { kind: 'direct'; mgPerMl: number };
  activities: Activities;
  submit: boolean;
};

const normalMuscle: Activities = {
  CS: [142, 151],
  CI: [35.2, 38.1],
  CII: [29.4, 31.2],
  CIII: [118, 124],
  CIV: [176, 187],
  'CI+III': [43.5, 46.2],
  'CII+III': [38.7, 41.4],
};

const plans: Partial<Record<DemoCaseName, Plan>> = {
  normal: { mode: 'plate', protein: { kind: 'curve', absorbance: 0.27, dilution: 10 }, activities: normalMuscle, submit: true },
  isolatedCI: {
    mode: 'traces',
    protein: { kind: 'curve', absorbance: 0.25, dilution: 10 },
    activities: { ...normalMuscle, CS: [155, 149], CI: [7.6, 8.3], 'CI+III': [9.1, 10.2] },
    submit: true,
  },
  isolatedCIV: {
    mode: 'rates',
    protein: { kind: 'direct', mgPerMl: 3.6 },
    activities: { ...normalMuscle, CS: [148, 153], CIV: [28.4, 31.5] },
    submit: true,
  },
  combined: {
    mode: 'rates',
    protein: { kind: 'direct', mgPerMl: 2.9 },
    activities: { ...normalMuscle, CS: [146, 151], CI: [9.2, 10.4], CIII: [44.5, 48.1], CIV: [38.2, 41.6], 'CI+III': [8.1, 9.4], 'CII+III': [19.8, 22.3] },
    submit: true,
  },
  raisedCS: {
    mode: 'rates',
    protein: { kind: 'direct', mgPerMl: 4.4 },
    activities: { CS: [265, 276], CI: [66.1, 68.4], CII: [53.8, 55.1], CIII: [214, 209], CIV: [321, 329], 'CI+III': [80.4, 82.2], 'CII+III': [71.6, 70.1] },
    submit: true,
  },
  corrected: {
    mode: 'rates',
    protein: { kind: 'direct', mgPerMl: 3.8 },
    activities: { ...normalMuscle, CS: [149, 152], CI: [14.9, 19.6] },
    submit: true,
  },
  awaitingReview: {
    mode: 'rates',
    protein: { kind: 'direct', mgPerMl: 4.1 },
    activities: { ...normalMuscle, CS: [158, 163], CIII: [52.3, 55.0], CIV: [71.2, 68.8] },
    submit: true,
  },
  fibroblasts: {
    mode: 'rates',
    protein: { kind: 'direct', mgPerMl: 1.6 },
    activities: { CS: [96, 101], CI: [14.2, 15.9], CII: [20.3, 19.1], CIV: [81, 86] },
    submit: false,
  },
};

/* ---------------------------------------------------------------- numbers */

/** mulberry32: small, seeded, the same on every machine. */
export function seeded(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const definitionOf = (a: AssayCode) => defaultAssayDefinitions.find((d) => d.code === a)!;

/** Conditions of the demo readings: plate wells (200 µL in 0.32 cm² → 0.625 cm) or a 1 mL, 1 cm cuvette. */
export const PLATE = { pathlengthCm: 0.625, reactionVolumeUl: 200, sampleVolumeUl: 5 };
const CUVETTE = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 20 };

/** The specific ΔA/min that gives `activity` (the activity formula of docs/domain.md §1, solved for the slope). */
export function specificSlope(assay: AssayCode, activity: number, c: typeof PLATE, proteinMgPerMl: number): number {
  const d = definitionOf(assay);
  const magnitude = (activity * d.epsilonPerMmPerCm * c.pathlengthCm * c.sampleVolumeUl * proteinMgPerMl) / (c.reactionVolumeUl * 1000);
  return d.direction === 'rises' ? magnitude : -magnitude;
}

/** Invented background slope: a tenth of the specific rate, same direction, where the assay subtracts one. */
export function backgroundSlope(assay: AssayCode, specific: number): number | null {
  return definitionOf(assay).background === 'none' ? null : specific * 0.1;
}

export const START: Record<AssayCode, number> = { CI: 0.95, CII: 1.1, CIII: 0.35, CIV: 1.55, 'CI+III': 0.4, 'CII+III': 0.45, CS: 0.18 };

export function trace(random: () => number, a0: number, slopePerMin: number, points = 21, stepS = 15): TracePoint[] {
  return Array.from({ length: points }, (_, i) => {
    const t = i * stepS;
    return { t, a: Number((a0 + (slopePerMin * t) / 60 + (random() - 0.5) * 0.0012).toFixed(4)) };
  });
}

/* ---------------------------------------------------------------- protein */

// Invented BCA standards around A = 0.058 + 0.515·c.
const BCA_STANDARDS = [
  { concentrationMgPerMl: 0, absorbance: 0.057 },
  { concentrationMgPerMl: 0.125, absorbance: 0.122 },
  { concentrationMgPerMl: 0.25, absorbance: 0.187 },
  { concentrationMgPerMl: 0.5, absorbance: 0.316 },
  { concentrationMgPerMl: 0.75, absorbance: 0.445 },
  { concentrationMgPerMl: 1, absorbance: 0.574 },
  { concentrationMgPerMl: 1.5, absorbance: 0.829 },
];

/* ---------------------------------------------------------------- the plate of the "normal" case */

const plateRows: [AssayCode, string][] = [
  ['CS', 'A'],
  ['CI', 'B'],
  ['CII', 'C'],
  ['CIII', 'D'],
  ['CIV', 'E'],
  ['CI+III', 'F'],
  ['CII+III', 'G'],
];

/** Each assay on its own row: replicate 1 in columns 1–2, replicate 2 in 3–4 (total, background); H1 a shared blank. */
export function demoPlateLayout(specimenRef: string): PlateMapEntry[] {
  const wells: PlateMapEntry[] = [];
  for (const [assay, row] of plateRows) {
    const hasBackground = definitionOf(assay).background !== 'none';
    for (const replicate of [1, 2]) {
      const col = replicate === 1 ? 1 : 3;
      wells.push({ well: `${row}${col}`, specimenRef, assay, role: 'total', replicate });
      if (hasBackground) wells.push({ well: `${row}${col + 1}`, specimenRef, assay, role: 'background', replicate });
      else wells.push({ well: 'H1', specimenRef, assay, role: 'blank', replicate });
    }
  }
  return wells;
}

function demoPlateFile(activities: Activities, proteinMgPerMl: number, random: () => number): string {
  const columns = new Map<string, TracePoint[]>();
  for (const [assay, row] of plateRows) {
    const pair = activities[assay];
    if (!pair) continue;
    pair.forEach((activity, i) => {
      const specific = specificSlope(assay, activity, PLATE, proteinMgPerMl);
      const bg = backgroundSlope(assay, specific);
      const col = i === 0 ? 1 : 3;
      columns.set(`${row}${col}`, trace(random, START[assay], specific + (bg ?? 0)));
      if (bg !== null) columns.set(`${row}${col + 1}`, trace(random, START[assay], bg));
    });
  }
  columns.set('H1', trace(random, 0.052, 0.0002));
  const wells = [...columns.keys()].sort();
  const lines = [
    '# Fernhollow Metabolic Laboratory (fictitious) - invented demo readings, not real measurements',
    '# plate_label: demo run 14, muscle homogenate A',
    '# temperature_c: 30',
    ['time_s', ...wells].join(','),
  ];
  const times = columns.get(wells[0]!)!.map((p) => p.t);
  times.forEach((t, i) => lines.push([String(t), ...wells.map((w) => columns.get(w)![i]!.a.toFixed(4))].join(',')));
  return `${lines.join('\n')}\n`;
}

/* ---------------------------------------------------------------- seeding */

export async function actor(email: string): Promise<User> {
  const u = await findUserByEmail(email);
  if (!u) throw new Error(`demo seed: account ${email} is missing`);
  return publicUser(u);
}

/**
 * Attaches the invented measurements to the demo cases and submits all but one for review (results frozen).
 * Also saves the plate layout as a reusable template. Returns the ids of the cases it submitted.
 */
export async function seedDemoMeasurements(sequelize: Sequelize, ids: Partial<DemoCaseIds>): Promise<number[]> {
  const tech = await actor('technologist@demo.test');
  const layout = await createPlateMap(sequelize, tech, {
    name: 'Seven assays in duplicate, one blank (demo)',
    description: 'Rows A–G: CS, CI, CII, CIII, CIV, CI+III, CII+III; columns 1–2 and 3–4: total and background of replicates 1 and 2; H1: blank.',
    wells: demoPlateLayout('A'),
  });
  const submitted: number[] = [];
  let seed = 20250301;
  for (const [name, plan] of Object.entries(plans) as [DemoCaseName, Plan][]) {
    const caseId = ids[name];
    if (caseId === undefined) continue;
    const random = seeded((seed += 7919));
    const specimen = (await listWorkupSpecimens(caseId)).find((s) => s.accepted);
    if (!specimen) continue;

    const protein =
      plan.protein.kind === 'curve'
        ? await saveSpecimenProtein(sequelize, tech, specimen.id, {
            kind: 'curve',
            method: 'BCA',
            model: 'linear',
            standards: BCA_STANDARDS,
            unknownAbsorbances: [plan.protein.absorbance, Number((plan.protein.absorbance + 0.006).toFixed(3))],
            dilutionFactor: plan.protein.dilution,
            version: specimen.version,
          })
        : await saveSpecimenProtein(sequelize, tech, specimen.id, {
            kind: 'direct',
            proteinMgPerMl: plan.protein.mgPerMl,
            proteinSource: 'BCA assay on the homogenate (invented demo value)',
            version: specimen.version,
          });
    const proteinMgPerMl = protein.proteinMgPerMl!;

    if (plan.mode === 'plate') {
      const text = demoPlateFile(plan.activities, proteinMgPerMl, random);
      await importPlate(sequelize, tech, caseId, { originalname: 'demo-run-14-muscle-A.csv', mimetype: 'text/csv', size: Buffer.byteLength(text), buffer: Buffer.from(text, 'utf8') }, {
        plateMapId: layout.id,
        wells: null,
        specimens: { A: specimen.id },
        pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
        reactionVolumeUl: PLATE.reactionVolumeUl,
        sampleVolumeUl: PLATE.sampleVolumeUl,
        windows: {},
      });
    } else {
      for (const [assay, pair] of Object.entries(plan.activities) as [AssayCode, [number, number]][]) {
        for (const [i, activity] of pair.entries()) {
          const specific = specificSlope(assay, activity, CUVETTE, proteinMgPerMl);
          const bg = backgroundSlope(assay, specific);
          const common = { specimenId: specimen.id, assay, replicate: i + 1, ...CUVETTE };
          const input: CreateMeasurementInput =
            plan.mode === 'traces'
              ? {
                  ...common,
                  mode: 'traces',
                  total: trace(random, START[assay], specific + (bg ?? 0)),
                  background: bg === null ? null : trace(random, START[assay], bg),
                  window: null,
                }
              : { ...common, mode: 'rates', totalRatePerMin: Number((specific + (bg ?? 0)).toFixed(5)), backgroundRatePerMin: bg === null ? null : Number(bg.toFixed(5)) };
          await createMeasurement(sequelize, tech, caseId, input);
        }
      }
    }

    if (plan.submit) {
      const c = await findCaseById(caseId);
      await submitCaseForReview(sequelize, tech, caseId, { version: c!.version });
      submitted.push(caseId);
    }
  }
  return submitted;
}
