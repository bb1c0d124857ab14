import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FlagCode } from '@/schemas/assay';
import { makeTestApp, type TestApp } from '../setup/test-app';

/*
 * The demo laboratory's measurements computed by the current engine: the window, artefact and plausibility
 * checks added for trustworthy numbers must not flag the invented, clean demo traces (they are straight lines
 * with ±0.0006 A of noise; server/db/seed/demo-measurements.ts).
 */

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const newChecks: FlagCode[] = [
  'CURVATURE',
  'NO_LINEAR_WINDOW',
  'LAG_EXCLUDED',
  'OUTLIER_READING',
  'HIGH_BACKGROUND_FRACTION',
  'HIGH_BLANK_FRACTION',
  'IMPLAUSIBLE_ACTIVITY',
  'A_INFINITY_UNUSED',
];

describe('demo data under the trust checks', () => {
  it('when the demo is seeded, then no demo measurement carries a window, artefact or plausibility flag', async () => {
    const [rows] = await t.sequelize.query('SELECT id, assay, flags FROM measurements');
    const measurements = rows as { id: number; assay: string; flags: string }[];
    expect(measurements.length).toBeGreaterThan(20);
    const flagged = measurements
      .map((m) => ({ id: m.id, assay: m.assay, codes: (JSON.parse(m.flags) as { code: FlagCode }[]).map((f) => f.code) }))
      .filter((m) => m.codes.some((c) => newChecks.includes(c)));
    expect(flagged).toEqual([]);
  });
});
