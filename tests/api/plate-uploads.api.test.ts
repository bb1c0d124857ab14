import { createHash } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { platePreviewSchema, plateImportResultSchema, type PlateImportPlan } from '@/schemas/measurement';
import { MAX_PLATE_ISSUES, type PlateMapEntry } from '@/schemas/plate';
import { createCase } from '../factories/cases';
import { makePlateFile } from '../factories/plate-file';
import { countRows, makeTestApp, type TestApp } from '../setup/test-app';

type Agent = Awaited<ReturnType<TestApp['signedIn']>>;
let t: TestApp;
let tech: Agent;
beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
});
afterAll(() => t.close());

const corpusDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../fixtures/plates');

/** A received case whose one muscle specimen (label A) has its protein recorded. */
async function caseWithProtein(proteinMgPerMl = 4) {
  const c = await createCase(tech);
  const s = c.specimens[0]!;
  const res = await tech.put(`/api/specimens/${s.id}/protein`).send({ kind: 'direct', proteinMgPerMl, proteinSource: 'BCA (test)', version: s.version });
  expect(res.status).toBe(200);
  return { caseId: c.id, specimenId: s.id, label: s.label };
}

const entry = (well: string, assay: PlateMapEntry['assay'], role: PlateMapEntry['role'], replicate = 1, specimenRef = 'A'): PlateMapEntry => ({
  well,
  specimenRef,
  assay,
  role,
  replicate,
});

function plan(wells: PlateMapEntry[], extra: Partial<PlateImportPlan> = {}): PlateImportPlan {
  return {
    plateMapId: null,
    wells,
    specimens: {},
    // 200 µL in a well of 0.32 cm²: 0.625 cm [derived arithmetic, docs/domain.md §1 pathlength].
    pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
    reactionVolumeUl: 200,
    sampleVolumeUl: 10,
    windows: {},
    ...extra,
  };
}

function send(url: string, file: Buffer | string, filename: string, p: PlateImportPlan | string) {
  return tech
    .post(url)
    .field('plan', typeof p === 'string' ? p : JSON.stringify(p))
    .attach('file', Buffer.isBuffer(file) ? file : Buffer.from(file, 'utf8'), filename);
}

const written = () => Promise.all(['uploads', 'measurements', 'audit_events'].map((x) => countRows(t.sequelize, x)));

/*
 * The whole fixture corpus through the upload route. Expected lines and columns are those of
 * tests/fixtures/plates/README.md, read from the files by eye; the API writes a named column as
 * "<header> (column <n>)".
 */
type Where = { row: number | null; column?: string | null; messageIncludes?: string };
const good: Record<string, PlateMapEntry[]> = {
  'good-comma-ci.csv': [entry('A1', 'CI', 'total'), entry('A2', 'CI', 'background'), entry('B1', 'CI', 'blank')],
  'good-tab-bom-crlf.tsv': [entry('C1', 'CS', 'total', 1), entry('C2', 'CS', 'total', 2), entry('C3', 'CS', 'blank', 1), entry('C3', 'CS', 'blank', 2)],
  'good-unordered-subset.csv': [entry('B3', 'CIV', 'total')],
  'good-cr-line-endings.csv': [entry('D4', 'CS', 'total'), entry('D5', 'CS', 'background')],
};
const bad: Record<string, Where[]> = {
  'bad-empty.csv': [{ row: null, messageIncludes: 'empty' }],
  'bad-comments-only.csv': [{ row: null }],
  'bad-header-only.csv': [{ row: 2 }],
  'bad-one-reading.csv': [{ row: 1 }],
  'bad-semicolon.csv': [{ row: 1 }],
  'bad-space-separated.txt': [{ row: 2 }],
  'bad-mixed-separators.csv': [{ row: 1 }],
  'bad-column-count.csv': [{ row: 5, column: 'B2 (column 5)' }],
  'bad-decimal-comma.csv': [{ row: 2 }, { row: 3 }],
  'bad-decimal-comma.tsv': [{ row: 2, column: 'A1 (column 2)' }],
  'bad-duplicate-well.csv': [{ row: 1, column: 'B3 (column 5)' }],
  'bad-duplicate-padded.csv': [{ row: 1, column: 'a01 (column 3)' }],
  'bad-well-names.csv': [
    { row: 1, column: 'I1 (column 3)' },
    { row: 1, column: 'A13 (column 4)' },
    { row: 1, column: 'blank (column 5)' },
  ],
  'bad-trailing-separator.csv': [{ row: 1 }],
  'bad-not-a-number.csv': [
    { row: 4, column: 'A2 (column 3)' },
    { row: 6, column: 'B1 (column 4)' },
  ],
  'bad-empty-cell.csv': [{ row: 3, column: 'A2 (column 3)' }],
  'bad-time-repeated.csv': [{ row: 4, column: 'time_s (column 1)' }],
  'bad-time-decreasing.csv': [{ row: 5, column: 'time_s (column 1)' }],
  'bad-clock-times.csv': [
    { row: 2, column: 'time_s (column 1)' },
    { row: 3, column: 'time_s (column 1)' },
  ],
  'bad-time-column-name.csv': [{ row: 1, column: 'Time (column 1)' }],
  'bad-time-not-first.csv': [{ row: 1 }],
  'bad-comment-after-header.csv': [{ row: 3 }],
  'bad-wavelength.csv': [{ row: 1 }],
  'bad-binary.bin': [{ row: 3 }],
  'bad-latin1.csv': [{ row: 2 }],
  'bad-utf16.csv': [{ row: 1 }],
  'bad-many-problems.csv': [],
};

describe('the plate-file corpus through the upload route', () => {
  it('when the corpus folder is listed, then every file has exactly one row in this table', () => {
    const files = readdirSync(corpusDir).filter((f) => f !== 'README.md').sort();
    expect(files).toEqual([...Object.keys(good), ...Object.keys(bad)].sort());
  });

  it.each(Object.entries(good))('%s: the preview answers every mapped group and lists unmapped wells', async (file, wells) => {
    const { caseId } = await caseWithProtein();
    const before = await written();
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, readFileSync(path.join(corpusDir, file)), file, plan(wells));
    expect(res.status).toBe(200);
    const preview = platePreviewSchema.parse(res.body);
    const groups = new Set(wells.map((w) => `${w.assay}|${w.replicate}`));
    expect(preview.groups).toHaveLength(groups.size);
    expect(preview.sha256).toBe(createHash('sha256').update(readFileSync(path.join(corpusDir, file))).digest('hex'));
    expect(await written()).toEqual(before);
  });

  it('good-comma-ci.csv: wells the map leaves out (B2) come back as a warning on the header line', async () => {
    const { caseId } = await caseWithProtein();
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, readFileSync(path.join(corpusDir, 'good-comma-ci.csv')), 'good-comma-ci.csv', plan(good['good-comma-ci.csv']!));
    expect(res.body.warnings).toEqual([expect.objectContaining({ row: 5, column: 'B2' })]);
  });

  it.each(Object.entries(bad))('%s: preview and save answer 400 FILE_REJECTED with the line and column, and nothing is written', async (file, where) => {
    const { caseId } = await caseWithProtein();
    const bytes = readFileSync(path.join(corpusDir, file));
    const before = await written();
    for (const url of [`/api/cases/${caseId}/plate-uploads/preview`, `/api/cases/${caseId}/plate-uploads`]) {
      const res = await send(url, bytes, file, plan([entry('A1', 'CI', 'total')]));
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('FILE_REJECTED');
      const issues = res.body.error.issues as { row: number | null; column: string | null; message: string }[];
      expect(issues.length).toBeGreaterThan(0);
      for (const w of where) {
        const match = issues.find((i) => i.row === w.row && (w.column === undefined || i.column === w.column));
        expect(match, `${file}: an issue at line ${w.row}${w.column ? `, column ${w.column}` : ''}`).toBeDefined();
        if (w.messageIncludes) expect(match!.message.toLowerCase()).toContain(w.messageIncludes);
      }
      if (file === 'bad-many-problems.csv') {
        // README: 64 readings are not numbers; the first MAX_PLATE_ISSUES are listed and the message counts the rest.
        expect(issues).toHaveLength(MAX_PLATE_ISSUES);
        expect(res.body.error.message).toMatch(/and 63 more/);
      }
    }
    expect(await written()).toEqual(before);
    expect((await tech.get(`/api/cases/${caseId}`)).body.state).toBe('received');
  });
});

describe('computing and saving a plate', () => {
  // Invented wells: CI total −0.03 /min, background (rotenone) −0.0052 /min, blank flat; replicate 2 the same.
  const slopes: Record<string, number> = { A1: -0.03, A2: -0.0052, A3: 0, B1: -0.03, B2: -0.0052 };
  const fileText = makePlateFile({ wells: Object.keys(slopes), slopeFor: (w) => slopes[w]!, decimals: 6, points: 40, intervalS: 10 });
  const wells = [
    entry('A1', 'CI', 'total', 1),
    entry('A2', 'CI', 'background', 1),
    entry('A3', 'CI', 'blank', 1),
    entry('B1', 'CI', 'total', 2),
    entry('B2', 'CI', 'background', 2),
    entry('A3', 'CI', 'blank', 2),
  ];
  // activity = 0.0248 × 200 × 1000 / (6.2 × 0.625 × 10 × 4) [derived, docs/domain.md §1 formula and pathlength]
  const expectedActivity = (0.0248 * 200 * 1000) / (6.2 * 0.625 * 10 * 4);

  it('when a generated plate is previewed, then each group has the activity of the published formula at the fill pathlength', async () => {
    const { caseId, specimenId } = await caseWithProtein(4);
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, fileText, 'run-1.csv', plan(wells));
    expect(res.status).toBe(200);
    const preview = platePreviewSchema.parse(res.body);
    expect(preview.pathlengthCm).toBeCloseTo(0.625, 12);
    expect(preview.groups.map((g) => [g.specimenId, g.replicate])).toEqual([[specimenId, 1], [specimenId, 2]]);
    for (const g of preview.groups) expect(g.result.activity).toBeCloseTo(expectedActivity, 3);
    expect(preview.summaries).toEqual([expect.objectContaining({ assay: 'CI', n: 2 })]);
    expect(preview.summaries[0]!.mean).toBeCloseTo(expectedActivity, 3);
  });

  it('when one window is moved, then that group is fitted over the new window only and nothing is stored', async () => {
    const { caseId } = await caseWithProtein(4);
    const before = await written();
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, fileText, 'run-1.csv', plan(wells, { windows: { 'A|CI|1': { fromS: 100, toS: 250 } } }));
    expect(res.status).toBe(200);
    const [first, second] = platePreviewSchema.parse(res.body).groups;
    expect(first!.result.window).toEqual({ fromS: 100, toS: 250 });
    expect(first!.result.windowAuto).toBe(false);
    expect(first!.result.fitTotal!.points).toBe(16);
    expect(second!.result.windowAuto).toBe(true);
    expect(await written()).toEqual(before);
  });

  it('when the plate is saved, then the file is kept with its SHA-256, each group is a measurement, and the file downloads unchanged', async () => {
    const { caseId } = await caseWithProtein(4);
    const res = await send(`/api/cases/${caseId}/plate-uploads`, fileText, 'run 1 (CI).csv', plan(wells));
    expect(res.status).toBe(201);
    const saved = plateImportResultSchema.parse(res.body);
    expect(saved.upload.sha256).toBe(createHash('sha256').update(fileText, 'utf8').digest('hex'));
    expect(saved.upload.sizeBytes).toBe(Buffer.byteLength(fileText));
    expect(saved.upload.measurementCount).toBe(2);
    expect(saved.measurementIds).toHaveLength(2);

    const measurements = (await tech.get(`/api/cases/${caseId}/measurements`)).body.items;
    expect(measurements.map((m: { uploadId: number; inputMode: string }) => [m.uploadId, m.inputMode])).toEqual([
      [saved.upload.id, 'plate'],
      [saved.upload.id, 'plate'],
    ]);
    expect(measurements[0].inputs.wells).toEqual({ total: 'A1', background: 'A2', blank: 'A3' });
    expect((await tech.get(`/api/cases/${caseId}`)).body.state).toBe('in_assay');
    expect((await tech.get(`/api/cases/${caseId}/uploads`)).body.items.map((u: { id: number }) => u.id)).toEqual([saved.upload.id]);

    const download = await tech.get(`/api/uploads/${saved.upload.id}/download`).buffer(true);
    expect(download.status).toBe(200);
    expect(download.headers['content-disposition']).toMatch(/^attachment; filename="run 1 \(CI\)\.csv"/);
    expect(Buffer.from(download.text ?? download.body).toString('utf8')).toBe(fileText);
  });

  it('when a saved plate measurement has its window moved, then it is recomputed from the kept readings', async () => {
    const { caseId } = await caseWithProtein(4);
    const saved = plateImportResultSchema.parse((await send(`/api/cases/${caseId}/plate-uploads`, fileText, 'run.csv', plan(wells))).body);
    const m = (await tech.get(`/api/cases/${caseId}/measurements`)).body.items.find((x: { id: number }) => x.id === saved.measurementIds[0]);
    const res = await tech.put(`/api/measurements/${m.id}`).send({ mode: 'plate', window: { fromS: 50, toS: 200 }, version: m.version });
    expect(res.status).toBe(200);
    expect(res.body.result.window).toEqual({ fromS: 50, toS: 200 });
    expect(res.body.activity).toBeCloseTo(expectedActivity, 3);
  });

  it('when the second group clashes with a saved replicate, then nothing is kept: no file, no measurements, no audit events', async () => {
    const { caseId, specimenId } = await caseWithProtein(4);
    const typed = await tech
      .post(`/api/cases/${caseId}/measurements`)
      .send({ mode: 'rates', specimenId, assay: 'CI', replicate: 2, pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 10, totalRatePerMin: -0.03, backgroundRatePerMin: -0.005 });
    expect(typed.status).toBe(201);
    const before = await written();
    const res = await send(`/api/cases/${caseId}/plate-uploads`, fileText, 'run.csv', plan(wells));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('CONFLICT');
    expect(res.body.error.message).toMatch(/Replicate 2 of CI is already saved/);
    expect(await written()).toEqual(before);
  });

  it('when the map names a well the file lacks, then 400 FILE_REJECTED names that well on the header line', async () => {
    const { caseId } = await caseWithProtein();
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, fileText, 'run.csv', plan([entry('H12', 'CI', 'total')]));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('FILE_REJECTED');
    expect(res.body.error.issues[0]).toMatchObject({ row: 3, column: 'H12' });
  });

  it('when a label of the map matches no specimen of the case, then 400 names plan.specimens.<label>', async () => {
    const { caseId } = await caseWithProtein();
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, fileText, 'run.csv', plan([entry('A1', 'CI', 'total'), entry('B1', 'CI', 'total', 1, 'Q')]));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual(['plan.specimens.Q']);
  });

  it('when the file or the plan is missing or unreadable, then 400 names file or plan', async () => {
    const { caseId } = await caseWithProtein();
    const noFile = await tech.post(`/api/cases/${caseId}/plate-uploads/preview`).field('plan', JSON.stringify(plan(wells)));
    expect(noFile.status).toBe(400);
    expect(noFile.body.error.fields).toHaveProperty('file');
    const badPlan = await send(`/api/cases/${caseId}/plate-uploads/preview`, fileText, 'run.csv', '{not json');
    expect(badPlan.status).toBe(400);
    expect(badPlan.body.error.fields).toHaveProperty('plan');
    const noMap = await send(`/api/cases/${caseId}/plate-uploads/preview`, fileText, 'run.csv', plan(wells, { wells: null }));
    expect(noMap.status).toBe(400);
    expect(noMap.body.error.fields).toHaveProperty('plan.plateMapId');
  });

  it('when a clinician or an admin uploads, then 403', async () => {
    const { caseId } = await caseWithProtein();
    for (const role of ['clinician', 'admin'] as const) {
      const agent = await t.signedIn(role);
      const res = await agent.post(`/api/cases/${caseId}/plate-uploads`).field('plan', JSON.stringify(plan(wells))).attach('file', Buffer.from(fileText), 'run.csv');
      expect(res.status).toBe(403);
      expect((await agent.get(`/api/uploads/1/download`)).status).toBe(403);
    }
  });
});

describe('saved plate maps', () => {
  const layout = [entry('A1', 'CS', 'total'), entry('A2', 'CS', 'background'), entry('H12', 'CS', 'blank')];

  it('when a map is saved and used by id, then the import reads the file with it', async () => {
    const created = await tech.post('/api/plate-maps').send({ name: 'CS single, test', description: 'one CS well pair', wells: layout });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ name: 'CS single, test', description: 'one CS well pair', version: 0 });
    expect((await tech.get('/api/plate-maps')).body.items.map((m: { id: number }) => m.id)).toContain(created.body.id);

    const { caseId } = await caseWithProtein();
    const file = makePlateFile({ wells: ['A1', 'A2', 'H12'], slopeFor: (w) => (w === 'A1' ? 0.05 : 0.002), wavelengthNm: 412 });
    const res = await send(`/api/cases/${caseId}/plate-uploads/preview`, file, 'cs.csv', plan([], { wells: null, plateMapId: created.body.id }));
    expect(res.status).toBe(200);
    expect(res.body.groups[0].wells).toEqual({ total: 'A1', background: 'A2', blank: 'H12' });
  });

  it('when two people save the same map, then the second gets 409 STALE_VERSION; a taken name gets 409 naming name', async () => {
    const created = (await tech.post('/api/plate-maps').send({ name: 'Edited twice', wells: layout })).body;
    expect((await tech.patch(`/api/plate-maps/${created.id}`).send({ description: 'first', version: created.version })).status).toBe(200);
    const stale = await tech.patch(`/api/plate-maps/${created.id}`).send({ description: 'second', version: created.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('STALE_VERSION');
    const dup = await tech.post('/api/plate-maps').send({ name: 'Edited twice', wells: layout });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields).toHaveProperty('name');
  });

  it('when a map gives one group two totals, then 400 names the entry', async () => {
    const res = await tech.post('/api/plate-maps').send({ name: 'Two totals', wells: [entry('A1', 'CI', 'total'), entry('A2', 'CI', 'total')] });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('wells.1.role');
  });

  it('when a map is deleted with its version, then it is gone', async () => {
    const created = (await tech.post('/api/plate-maps').send({ name: 'Short-lived', wells: layout })).body;
    expect((await tech.delete(`/api/plate-maps/${created.id}?version=${created.version}`)).status).toBe(204);
    expect((await tech.get(`/api/plate-maps/${created.id}`)).status).toBe(404);
  });
});
