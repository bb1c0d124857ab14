import { createHash } from 'node:crypto';
import type { Sequelize } from 'sequelize';
import { DEMO_INTERVAL_SET_LABEL, demoReferenceIntervals } from '@/schemas/assay';
import type { AssayCode } from '@/schemas/common';
import { recordAudit } from '../../modules/audit/audit.service';
import { intervalKeyOf } from '../../modules/reference-intervals/interval-labels';
import {
  countIntervals,
  insertControlUpload,
  insertInterval,
} from '../../modules/reference-intervals/reference-intervals.repository';
import { findUserByEmail } from '../../modules/users/users.repository';

export const DEMO_INTERVALS_EFFECTIVE_FROM = '2025-01-01';
export const DEMO_CONTROL_FILENAME = 'fernhollow-muscle-controls-DEMO-invented.csv';
export const DEMO_CONTROL_SUBJECTS = 130;

const DEMO_SOURCE_NOTE =
  'Invented demo values for the fictitious Fernhollow Metabolic Laboratory: mean ± 2 SD of made-up numbers, ' +
  'with an invented n. Not derived from any real controls and not for clinical use.';

/** mulberry32: a small seeded generator, so the demo file is the same on every machine. */
function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function gaussian(random: () => number): number {
  const u = Math.max(random(), 1e-12);
  const v = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

/** Invented typical activities (nmol/min/mg protein) and between-subject spread, shaped like the demo set. */
const DEMO_CONTROL_PROFILE: Record<AssayCode, { mean: number; cv: number }> = {
  CI: { mean: 37, cv: 0.18 },
  CII: { mean: 30, cv: 0.16 },
  CIII: { mean: 120, cv: 0.18 },
  CIV: { mean: 180, cv: 0.2 },
  'CI+III': { mean: 45, cv: 0.2 },
  'CII+III': { mean: 40, cv: 0.18 },
  CS: { mean: 150, cv: 0.12 },
};

/**
 * An invented control-data file: fictitious muscle controls of all ages, one row each. A shared
 * "mitochondrial content" factor moves every activity of a subject together (so ratios to CS are tighter
 * than activities), adults have somewhat higher complex IV, and two rows carry implausible values so the
 * outlier rules have something to find.
 */
export function buildDemoControlCsv(subjects: number = DEMO_CONTROL_SUBJECTS): string {
  const random = seededRandom(20250101);
  const assays = Object.keys(DEMO_CONTROL_PROFILE) as AssayCode[];
  const lines = [`control_id,specimen_type,age_years,${assays.map((a) => `${a} (nmol/min/mg protein)`).join(',')}`];
  for (let i = 1; i <= subjects; i++) {
    const child = i % 2 === 0;
    const age = child ? 0.3 + random() * 15.5 : 16 + random() * 58;
    const content = Math.exp(0.12 * gaussian(random));
    const cells = assays.map((assay) => {
      const { mean, cv } = DEMO_CONTROL_PROFILE[assay];
      const ageEffect = assay === 'CIV' && !child ? 1.12 : 1;
      const own = assay === 'CS' ? 1 : Math.exp(cv * gaussian(random));
      let value = mean * ageEffect * content * own * (assay === 'CS' ? Math.exp(cv * gaussian(random)) : 1);
      if (i === 17 && assay === 'CIV') value *= 3.2;
      if (i === 88 && assay === 'CI') value *= 0.15;
      return value.toFixed(1);
    });
    lines.push([`DEMO-C${String(i).padStart(3, '0')}`, 'skeletal_muscle', age.toFixed(1), ...cells].join(','));
  }
  return `${lines.join('\n')}\n`;
}

/**
 * Seeds the invented demo interval set as version 1, drafted by director2@demo.test and approved by
 * director@demo.test (two directors, as separation of duties asks), in effect from 2025-01-01, and an
 * invented control file for trying derivation. Does nothing when intervals already exist.
 */
export async function seedDemoIntervals(sequelize: Sequelize): Promise<void> {
  if ((await countIntervals()) > 0) return;
  const director = await findUserByEmail('director@demo.test');
  const approverId = director?.id ?? null;
  const drafterId = (await findUserByEmail('director2@demo.test'))?.id ?? approverId;
  // The approval is recorded when the seed runs: it is the truthful time of this (invented) approval.
  const approvedAt = new Date();
  const csv = Buffer.from(buildDemoControlCsv(), 'utf8');
  await sequelize.transaction(async (transaction) => {
    for (const d of demoReferenceIntervals) {
      const ageMinYears = d.ageFromYears ?? 0;
      const ageMaxYears = d.ageToYears;
      const created = await insertInterval(
        {
          intervalKey: intervalKeyOf({ assay: d.assay, measure: d.measure, specimenType: d.specimenType, ageMinYears, ageMaxYears }),
          version: d.version,
          status: 'approved',
          setName: DEMO_INTERVAL_SET_LABEL,
          assay: d.assay,
          measure: d.measure,
          specimenType: d.specimenType,
          ageLabel: 'All ages',
          ageMinYears,
          ageMaxYears,
          lower: d.lower,
          upper: d.upper,
          mean: d.mean,
          sd: d.sd,
          n: 40,
          unit: d.unit,
          basis: d.basis,
          method: 'mean2sd',
          derivation: null,
          sourceNote: DEMO_SOURCE_NOTE,
          uploadId: null,
          effectiveFrom: DEMO_INTERVALS_EFFECTIVE_FROM,
          effectiveTo: null,
          createdById: drafterId,
          approvedById: approverId,
          approvedAt,
        },
        transaction,
      );
      await recordAudit(
        null,
        { action: 'create', entity: 'reference-interval', entityId: created.id, after: created, note: 'Demo seed (invented values)' },
        transaction,
      );
    }
    const uploadId = await insertControlUpload(
      {
        filename: DEMO_CONTROL_FILENAME,
        mimeType: 'text/csv',
        content: csv,
        sha256: createHash('sha256').update(csv).digest('hex'),
        uploadedById: approverId,
      },
      transaction,
    );
    await recordAudit(
      null,
      { action: 'upload', entity: 'upload', entityId: uploadId, note: 'Demo seed: invented control subjects' },
      transaction,
    );
  });
}
