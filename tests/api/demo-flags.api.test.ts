import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../setup/test-app';

/*
 * The demo laboratory's measurements computed by the current engine. The demo traces are invented straight
 * lines with ±0.0006 A of noise and plausible rates (server/db/seed/demo-measurements.ts), so the window,
 * artefact and plausibility checks must find nothing to say about any of them.
 */

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

describe('demo data under the trust checks', () => {
  it('when the demo is seeded, then every demo measurement has an activity and no flag at all', async () => {
    const [rows] = await t.sequelize.query('SELECT id, assay, activity, flags FROM measurements');
    const measurements = rows as { id: number; assay: string; activity: number | null; flags: string }[];
    expect(measurements.length).toBeGreaterThan(20);
    const flagged = measurements.filter((m) => m.activity === null || JSON.parse(m.flags).length > 0);
    expect(flagged).toEqual([]);
  });
});
