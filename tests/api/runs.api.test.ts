import { mkdirSync, writeFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mean as ssMean } from 'simple-statistics';
import type { AssayCode } from '@/schemas/common';
import { wellIdsOf, type PlateFormat } from '@/schemas/plate';
import {
  runDetailSchema,
  runImportResultSchema,
  runListSchema,
  runPreviewSchema,
  type RunPlan,
  type RunWell,
} from '@/schemas/run';
import { createCase } from '../factories/cases';
import { readPdf } from '../factories/pdf-text';
import { makePlateFile } from '../factories/plate-file';
import { countRows, DEMO_PASSWORD, makeTestApp, type TestApp } from '../setup/test-app';

/*
 * Analytical runs (issue 12): one plate for several cases and the controls, imported in one transaction, judged
 * by the Westgard rules (Westgard JO, Barry PL, Hunt MR, Groth T, Clin Chem 1981;27:493–501 [confirmed: the
 * issue cites it]), and released only from an accepted run or a director's documented override
 * (CLIA 42 CFR 493.1256 [from memory: control procedures for every run, corrective action documented]).
 */

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
let director: Agent;
let director2: Agent;
beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
  director = await t.signedIn('director');
  director2 = await t.signedIn('director2');
});
afterAll(() => t.close());

let fileSerial = 0;
/** A synthetic plate file with these wells; each call gives a different file (so a different SHA-256). */
function plateFile(wells: readonly string[]): Buffer {
  fileSerial += 1;
  return Buffer.from(`# note: test plate ${fileSerial}\n${makePlateFile({ wells, points: 20 })}`, 'utf8');
}

/** A received case whose muscle specimen has its protein recorded. */
async function caseWithProtein(proteinMgPerMl = 4) {
  const c = await createCase(tech);
  const s = c.specimens[0]!;
  const res = await tech.put(`/api/specimens/${s.id}/protein`).send({ kind: 'direct', proteinMgPerMl, proteinSource: 'BCA (test)', version: s.version });
  expect(res.status).toBe(200);
  return { caseId: c.id, accession: c.accession, specimenId: s.id };
}

let materialSerial = 0;
async function controlMaterial(level = 'Level 1'): Promise<number> {
  materialSerial += 1;
  const res = await director
    .post('/api/control-materials')
    .send({ name: `Test homogenate ${materialSerial}`, lot: `T-${materialSerial}`, level, expiresOn: '2030-12-31' });
  expect(res.status).toBe(201);
  return res.body.id as number;
}

/** An approved target: entered by one director, approved by another (qc-core's routes). */
async function approvedTarget(materialId: number, assayCode: AssayCode, mean: number, sd: number) {
  const created = await director.post(`/api/control-materials/${materialId}/targets`).send({ assayCode, mean, sd });
  expect(created.status).toBe(201);
  const approved = await director2.post(`/api/control-targets/${created.body.id}/approve`).send({});
  expect(approved.status).toBe(200);
}

const specimenWell = (well: string, specimenId: number, replicate = 1, role: 'total' | 'background' | 'blank' = 'total', assay: AssayCode = 'CI'): RunWell => ({
  use: 'specimen',
  well,
  specimenId,
  assay,
  role,
  replicate,
});
const controlWell = (well: string, controlMaterialId: number, replicate = 1, role: 'total' | 'background' | 'blank' = 'total'): RunWell => ({
  use: 'control',
  well,
  controlMaterialId,
  assay: 'CI',
  role,
  replicate,
});

let day = 0;
function plan(wells: RunWell[], extra: Partial<RunPlan> = {}): RunPlan {
  // Runs in time order, one a day, all in the past.
  day += 1;
  const startedAt = new Date(Date.UTC(2026, 6, 1, 9, 0) + day * 86_400_000).toISOString();
  const controls = [...new Set(wells.flatMap((w) => (w.use === 'control' ? [w.controlMaterialId] : [])))];
  return {
    instrument: 'Test reader 1',
    startedAt,
    plateFormat: 96,
    wells,
    // 200 µL in a well of 0.32 cm²: 0.625 cm [derived: volume / area].
    pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
    reactionVolumeUl: 200,
    sampleVolumeUl: 10,
    controlProteinMgPerMl: Object.fromEntries(controls.map((id) => [String(id), 2.5])),
    windows: {},
    ...extra,
  };
}

function send(agent: Agent, url: string, file: Buffer, p: RunPlan, filename = 'run.csv') {
  return agent.post(url).field('plan', JSON.stringify(p)).attach('file', file, filename);
}

const tables = ['analytical_runs', 'uploads', 'measurements', 'control_results', 'audit_events'] as const;
const counts = async (): Promise<Record<(typeof tables)[number], number>> =>
  Object.fromEntries(await Promise.all(tables.map(async (x) => [x, await countRows(t.sequelize, x)] as const))) as Record<(typeof tables)[number], number>;

async function caseVersion(caseId: number): Promise<{ state: string; version: number }> {
  const res = await tech.get(`/api/cases/${caseId}`);
  expect(res.status).toBe(200);
  return { state: res.body.state, version: res.body.version };
}

describe('a multi-case run', () => {
  it('imports every case, the controls and the file in one go; the run page lists them', async () => {
    const a = await caseWithProtein();
    const b = await caseWithProtein(3);
    const material = await controlMaterial();
    const wells: RunWell[] = [
      specimenWell('A1', a.specimenId, 1),
      specimenWell('A2', a.specimenId, 1, 'background'),
      specimenWell('A3', a.specimenId, 2),
      specimenWell('B1', b.specimenId, 1),
      controlWell('C1', material, 1),
      controlWell('C2', material, 2),
      { use: 'blank', well: 'D1' },
      controlWell('D1', material, 1, 'blank'),
      controlWell('D1', material, 2, 'blank'),
    ];
    const file = plateFile(['A1', 'A2', 'A3', 'B1', 'C1', 'C2', 'D1', 'H12']);
    const p = plan(wells);

    const preview = await send(tech, '/api/runs/preview', file, p);
    expect(preview.status).toBe(200);
    const pv = runPreviewSchema.parse(preview.body);
    expect(pv.groups).toHaveLength(5);
    // Only H12 is unused; D1 is a plate blank, not a stray well.
    expect(pv.warnings.map((w) => w.column)).toEqual(['H12']);
    const controlGroups = pv.groups.filter((g) => g.use === 'control');
    expect(controlGroups).toHaveLength(2);
    // A control's value is the mean of its replicate groups' activities (checked with simple-statistics).
    expect(pv.controls).toHaveLength(1);
    expect(pv.controls[0]!.value).toBeCloseTo(ssMean(controlGroups.map((g) => g.result.activity!)), 10);
    // No approved target for this material: nothing to judge.
    expect(pv.qc.status).toBe('none');

    const before = await counts();
    const res = await send(tech, '/api/runs', file, p);
    expect(res.status).toBe(201);
    const out = runImportResultSchema.parse(res.body);
    expect(out.run.runNumber).toMatch(/^RUN-\d{4}-\d{4}$/);
    expect(out.measurementIds).toHaveLength(3);
    expect(out.controlResultIds).toHaveLength(1);
    const after = await counts();
    expect(after.analytical_runs - before.analytical_runs).toBe(1);
    expect(after.uploads - before.uploads).toBe(1);
    expect(after.measurements - before.measurements).toBe(3);
    expect(after.control_results - before.control_results).toBe(1);

    const detail = runDetailSchema.parse((await tech.get(`/api/runs/${out.run.id}`)).body);
    expect(detail.wells).toHaveLength(wells.length);
    expect(detail.caseCount).toBe(2);
    expect(new Set(detail.measurements.map((m) => m.accession))).toEqual(new Set([a.accession, b.accession]));
    expect(detail.upload?.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(detail.controls[0]!.value).toBeCloseTo(pv.controls[0]!.value!, 10);

    // Both cases moved to in assay, and their results name the run.
    expect((await caseVersion(a.caseId)).state).toBe('in_assay');
    const results = await tech.get(`/api/cases/${b.caseId}/results`);
    const rep = results.body.specimens[0].assays[0].replicates[0];
    expect(rep.run).toEqual({ runId: out.run.id, runNumber: out.run.runNumber, qcStatus: 'none', overrideReason: null });

    const list = runListSchema.parse((await tech.get('/api/runs?status=none&pageSize=200')).body);
    expect(list.items.map((r) => r.id)).toContain(out.run.id);
  });

  it('refuses a control without its protein, naming the field, and writes nothing', async () => {
    const material = await controlMaterial();
    const before = await counts();
    const res = await send(tech, '/api/runs', plateFile(['A1']), plan([controlWell('A1', material)], { controlProteinMgPerMl: {} }));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual([`plan.controlProteinMgPerMl.${material}`]);
    expect(await counts()).toEqual(before);
  });
});

describe('one bad group keeps nothing', () => {
  it('a closed (cancelled) case among good ones → 409 naming the case; no row is written', async () => {
    const good = await caseWithProtein();
    const closed = await caseWithProtein();
    const v = await caseVersion(closed.caseId);
    const cancelled = await tech.post(`/api/cases/${closed.caseId}/cancel`).send({ reason: 'Duplicate request', version: v.version });
    expect(cancelled.status).toBe(200);
    const before = await counts();
    const res = await send(tech, '/api/runs', plateFile(['A1', 'B1']), plan([specimenWell('A1', good.specimenId), specimenWell('B1', closed.specimenId)]));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain(closed.accession);
    expect(await counts()).toEqual(before);
    expect((await caseVersion(good.caseId)).state).toBe('received');
  });

  it('a replicate already saved in one case → 409 naming the group; the other case gets nothing', async () => {
    const a = await caseWithProtein();
    const b = await caseWithProtein();
    const first = await send(tech, '/api/runs', plateFile(['A1']), plan([specimenWell('A1', b.specimenId, 1)]));
    expect(first.status).toBe(201);
    const before = await counts();
    const res = await send(
      tech,
      '/api/runs',
      plateFile(['A1', 'A2', 'B1']),
      plan([specimenWell('A1', a.specimenId, 1), specimenWell('A2', a.specimenId, 2), specimenWell('B1', b.specimenId, 1)]),
    );
    expect(res.status).toBe(409);
    expect(Object.keys(res.body.error.fields)).toEqual([`groups.specimen:${b.specimenId}|CI|1`]);
    expect(res.body.error.message).toContain('Replicate 1 of CI');
    expect(await counts()).toEqual(before);
  });

  it('a well the file lacks → 400 naming the well; nothing written', async () => {
    const a = await caseWithProtein();
    const before = await counts();
    const res = await send(tech, '/api/runs', plateFile(['A1']), plan([specimenWell('A1', a.specimenId, 1), specimenWell('G7', a.specimenId, 2)]));
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].column).toBe('G7');
    expect(await counts()).toEqual(before);
  });
});

describe('plate formats (ANSI/SLAS 4-2004 well positions [from memory])', () => {
  async function importFormat(format: PlateFormat, used: string[]) {
    const a = await caseWithProtein();
    const wells = used.map((w, i) => specimenWell(w, a.specimenId, i + 1));
    return send(tech, '/api/runs', plateFile(wellIdsOf(format)), plan(wells, { plateFormat: format }));
  }

  it('imports a whole 384-well file using wells up to P24', async () => {
    const res = await importFormat(384, ['A1', 'I13', 'P24']);
    expect(res.status).toBe(201);
    const detail = runDetailSchema.parse((await tech.get(`/api/runs/${res.body.run.id}`)).body);
    expect(detail.plateFormat).toBe(384);
    expect(detail.wells.map((w) => w.well)).toEqual(['A1', 'I13', 'P24']);
    expect(detail.measurements).toHaveLength(3);
  });

  it('imports a 24-well file (A1 to D6)', async () => {
    const res = await importFormat(24, ['A1', 'D6']);
    expect(res.status).toBe(201);
    expect(res.body.run.plateFormat).toBe(24);
  });

  it('refuses P24 on a 96-well plan and E1 on a 24-well plan, naming the layout entry', async () => {
    const a = await caseWithProtein();
    const r96 = await send(tech, '/api/runs/preview', plateFile(['A1']), plan([specimenWell('P24', a.specimenId)]));
    expect(r96.status).toBe(400);
    expect(r96.body.error.fields['plan.wells.0.well']).toContain('not on a 96-well plate');
    const r24 = await send(tech, '/api/runs/preview', plateFile(['A1']), plan([specimenWell('E1', a.specimenId)], { plateFormat: 24 }));
    expect(r24.status).toBe(400);
    expect(r24.body.error.fields['plan.wells.0.well']).toContain('A1 to D6');
  });
});

describe('the release gate and the override', () => {
  /**
   * A run carrying one case and one control whose z against its approved target is `z`: the control's value is
   * read from a preview, then the target is set at mean = value − z·sd with sd = value / 10.
   */
  async function runWithControlZ(z: number) {
    const c = await caseWithProtein();
    const material = await controlMaterial();
    const file = plateFile(['A1', 'B1', 'B2']);
    const p = plan([specimenWell('A1', c.specimenId), controlWell('B1', material, 1), controlWell('B2', material, 2)]);
    const pv = runPreviewSchema.parse((await send(tech, '/api/runs/preview', file, p)).body);
    const value = pv.controls[0]!.value!;
    const sd = Math.abs(value) / 10;
    await approvedTarget(material, 'CI', value - z * sd, sd);
    const res = await send(tech, '/api/runs', file, p);
    expect(res.status).toBe(201);
    return { c, run: res.body.run as { id: number; runNumber: string; qcStatus: string } };
  }

  async function submit(caseId: number) {
    const { version } = await caseVersion(caseId);
    return tech.post(`/api/cases/${caseId}/submit`).send({ version });
  }

  it('a rejected run (one result beyond 3 SD: 1-3s) blocks submission with QC_NOT_ACCEPTED naming the run', async () => {
    const { c, run } = await runWithControlZ(3.5);
    expect(run.qcStatus).toBe('reject');
    const detail = runDetailSchema.parse((await tech.get(`/api/runs/${run.id}`)).body);
    expect(detail.violations.map((v) => v.rule)).toContain('1-3s');
    expect(detail.controls[0]!.z).toBeCloseTo(3.5, 6);
    const res = await submit(c.caseId);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('QC_NOT_ACCEPTED');
    expect(res.body.error.message).toContain(run.runNumber);
    expect((await caseVersion(c.caseId)).state).toBe('in_assay');
  });

  it('a warning (2 < z ≤ 3: 1-2s only) passes', async () => {
    const { c, run } = await runWithControlZ(2.5);
    expect(run.qcStatus).toBe('warn');
    expect((await submit(c.caseId)).status).toBe(200);
  });

  it('an override needs a director, a reason of 10+ characters and the right password; it is audited and releases the run', async () => {
    const { c, run } = await runWithControlZ(-3.6);
    expect(run.qcStatus).toBe('reject');
    const url = `/api/runs/${run.id}/override`;
    const reason = 'Control vial thawed twice; patient results consistent with repeat on run of the next day';

    expect((await tech.post(url).send({ reason, password: DEMO_PASSWORD })).status).toBe(403);
    const short = await director.post(url).send({ reason: 'too short', password: DEMO_PASSWORD });
    expect(short.status).toBe(400);
    expect(short.body.error.fields.reason).toBeDefined();
    const noReason = await director.post(url).send({ password: DEMO_PASSWORD });
    expect(noReason.status).toBe(400);
    const wrong = await director.post(url).send({ reason, password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect((await tech.get(`/api/runs/${run.id}`)).body.override).toBeNull();
    expect((await submit(c.caseId)).status).toBe(409);

    const auditBefore = await countRows(t.sequelize, 'audit_events');
    const ok = await director.post(url).send({ reason, password: DEMO_PASSWORD });
    expect(ok.status).toBe(200);
    expect(ok.body.override.reason).toBe(reason);
    expect(await countRows(t.sequelize, 'audit_events')).toBeGreaterThan(auditBefore);
    const [rows] = await t.sequelize.query(`SELECT "action", "note" FROM "audit_events" WHERE "entity" = 'run' AND "entityId" = '${run.id}' AND "action" = 'override'`);
    expect(rows).toEqual([{ action: 'override', note: reason }]);
    // Released once only.
    expect((await director.post(url).send({ reason, password: DEMO_PASSWORD })).status).toBe(409);

    const results = await tech.get(`/api/cases/${c.caseId}/results`);
    expect(results.body.specimens[0].assays[0].replicates[0].run).toMatchObject({ runNumber: run.runNumber, qcStatus: 'reject', overrideReason: reason });
    expect((await submit(c.caseId)).status).toBe(200);

    // The signed report names the run and the override with its reason: in the JSON and in the PDF's methods section.
    const signed = await director.post(`/api/cases/${c.caseId}/sign`).send({ password: DEMO_PASSWORD });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);
    const report = await tech.get(`/api/reports/${signed.body.report.id}`);
    expect(report.body.runs).toEqual([
      expect.objectContaining({ runNumber: run.runNumber, qcStatus: 'reject', overrideReason: reason, results: expect.stringContaining('CI') }),
    ]);
    const file = await binary(tech.get(`/api/reports/${signed.body.report.id}/pdf`));
    expect(file.status).toBe(200);
    mkdirSync('test-artifacts', { recursive: true });
    writeFileSync('test-artifacts/run-override-report.pdf', file.body as Buffer);
    // Read back with pdfjs-dist, an independent PDF reader.
    const methods = (await readPdf(file.body as Buffer)).flat.split('Methods and traceability')[1] ?? '';
    expect(methods).toContain('Analytical runs and quality control');
    expect(methods).toContain(`Run ${run.runNumber}`);
    expect(methods).toContain('released by a director');
    expect(methods).toContain('Control vial thawed twice');
  });
});

/** A supertest response body as a Buffer (PDFs come back binary). */
function binary(req: ReturnType<Agent['get']>) {
  return req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (chunk: Buffer) => chunks.push(chunk));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

describe('the same import sent twice at once', () => {
  it('saves one run; the other answer is a 409 and nothing is doubled', async () => {
    const a = await caseWithProtein();
    const b = await caseWithProtein();
    const file = plateFile(['A1', 'B1']);
    const p = plan([specimenWell('A1', a.specimenId), specimenWell('B1', b.specimenId)]);
    const before = await counts();
    const answers = await Promise.all([send(tech, '/api/runs', file, p), send(tech, '/api/runs', file, p)]);
    expect(answers.map((r) => r.status).sort()).toEqual([201, 409]);
    const after = await counts();
    expect(after.analytical_runs - before.analytical_runs).toBe(1);
    expect(after.uploads - before.uploads).toBe(1);
    expect(after.measurements - before.measurements).toBe(2);
  });
});

describe('the demo history', () => {
  it('has 22 runs: one 1-2s warning, one 1-3s rejection, one 2-2s rejection released by a director, the rest accepted', async () => {
    const list = runListSchema.parse((await tech.get('/api/runs?q=demo&pageSize=200')).body);
    const demo = list.items.filter((r) => r.instrument === 'Plate reader 2 (demo)').reverse();
    expect(demo).toHaveLength(22);
    const by = (n: number) => demo[n - 1]!;
    // Seeded z-values (server/db/seed/demo-runs.ts) judged by the rule definitions of Westgard et al. 1981:
    // 1-2s: one |z| > 2 → warning; 1-3s: one |z| > 3 → reject; 2-2s: two levels > +2 in the same run → reject.
    expect(by(12)).toMatchObject({ qcStatus: 'warn', override: null });
    expect(by(12).violations.map((v) => v.rule)).toEqual(['1-2s']);
    expect(by(16)).toMatchObject({ qcStatus: 'reject', override: null });
    expect(by(16).violations.map((v) => v.rule)).toContain('1-3s');
    expect(by(19).qcStatus).toBe('reject');
    expect(by(19).violations.map((v) => v.rule)).toContain('2-2s');
    expect(by(19).override?.reason).toMatch(/new NADH lot/);
    const others = demo.filter((_, i) => ![12, 16, 19].includes(i + 1));
    expect(others.map((r) => r.qcStatus)).toEqual(others.map(() => 'accept'));
    // The last two carry a demo case's specimen.
    expect(by(21).caseCount).toBe(1);
    expect(by(22).caseCount).toBe(1);
  });
});
