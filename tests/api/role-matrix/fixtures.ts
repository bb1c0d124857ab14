import { expect } from 'vitest';
import type request from 'supertest';
import type { CaseDetail } from '@/schemas/case';
import type { PlateMapEntry } from '@/schemas/plate';
import type { RunWell } from '@/schemas/run';
import { createCase, createPatient } from '../../factories/cases';
import { cuvette, recordDirectProtein } from '../../factories/measurements';
import { makePlateFile } from '../../factories/plate-file';
import { createCaseAwaitingReview, createCaseWithAssays } from '../../factories/workup';
import { DEMO_PASSWORD } from '../../setup/test-app';
import type { Ctx } from './harness';

/*
 * Records the matrix's requests point at, each made through the API as the laboratory would make it (or read from
 * the seeded demo data). Every value is an invented fixture.
 */

let serial = 0;
/** A number no earlier fixture of this file used: keeps names, lots and e-mail addresses unique. */
export const nextSerial = () => (serial += 1);

export function ok(res: request.Response, status: number, what: string): request.Response {
  expect(res.status, `${what}: ${JSON.stringify(res.body).slice(0, 400)}`).toBe(status);
  return res;
}

/** Typed CI rates for 40 µg protein in 1 mL, 1 cm: total −0.03, background −0.0052 A/min, so ΔA/min −0.0248. */
export const ciRates = (specimenId: number, replicate = 1) => ({
  mode: 'rates' as const,
  specimenId,
  assay: 'CI' as const,
  replicate,
  ...cuvette,
  totalRatePerMin: -0.03,
  backgroundRatePerMin: -0.0052,
});
/**
 * CI activity of `ciRates`: 0.0248 ΔA/min × 4032.3 (the consensus calculation factor for CI at 40 µg protein in a
 * 1 mL, 1 cm cuvette) = 100.0 nmol/min/mg [derived, docs/domain.md §1].
 */
export const CI_RATES_ACTIVITY = 100.0;

export function fixtures(ctx: Ctx) {
  const tech = () => ctx.as('technologist');
  const director = () => ctx.as('director');

  async function caseWithProtein(referringClinicianId?: number) {
    const c = await createCase(tech(), referringClinicianId ? { referringClinicianId } : {});
    const s = c.specimens[0]!;
    ok(await recordDirectProtein(tech(), s, 4, 'BCA (matrix fixture)'), 200, 'protein');
    return { caseId: c.id, specimenId: s.id, accession: c.accession };
  }

  async function measurement() {
    const c = await caseWithProtein();
    const res = ok(await tech().post(`/api/cases/${c.caseId}/measurements`).send(ciRates(c.specimenId)), 201, 'measurement');
    return { ...c, id: res.body.id as number, version: res.body.version as number };
  }

  const caseOf = async (id: number): Promise<CaseDetail> => ok(await tech().get(`/api/cases/${id}`), 200, 'case').body as CaseDetail;

  async function awaitingReview(): Promise<CaseDetail> {
    return createCaseAwaitingReview(tech(), { referringClinicianId: ctx.clinicianId() });
  }

  /** A case signed by the demo director: final, with its first report. */
  async function signedCase(referringClinicianId = ctx.clinicianId()) {
    const c = await createCaseAwaitingReview(tech(), { referringClinicianId });
    const res = ok(await director().post(`/api/cases/${c.id}/sign`).send({ password: DEMO_PASSWORD }), 201, 'sign');
    return { caseId: c.id, accession: c.accession, reportId: res.body.report.id as number };
  }

  let plateSerial = 0;
  /** A synthetic plate file (different bytes every call) with a CI total and background well pair. */
  function plateFile(wells: readonly string[] = ['A1', 'A2']): Buffer {
    plateSerial += 1;
    return Buffer.from(`# note: matrix fixture plate ${plateSerial}\n${makePlateFile({ wells, points: 20 })}`, 'utf8');
  }
  const plateWells: PlateMapEntry[] = [
    { well: 'A1', specimenRef: 'A', assay: 'CI', role: 'total', replicate: 1 },
    { well: 'A2', specimenRef: 'A', assay: 'CI', role: 'background', replicate: 1 },
  ];
  const platePlan = () => ({
    plateMapId: null,
    wells: plateWells,
    specimens: {},
    // 200 µL in a well of 0.32 cm²: 0.625 cm [derived: volume / area].
    pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
    reactionVolumeUl: 200,
    sampleVolumeUl: 10,
    windows: {},
  });
  const sendPlate = (agent: request.Agent, url: string, file: Buffer) =>
    agent.post(url).field('plan', JSON.stringify(platePlan())).attach('file', file, 'matrix-plate.csv');

  /** A case with one imported plate file: its upload id and the bytes sent. */
  async function plateUpload() {
    const c = await caseWithProtein();
    const file = plateFile();
    const res = ok(await sendPlate(tech(), `/api/cases/${c.caseId}/plate-uploads`, file), 201, 'plate import');
    return { ...c, uploadId: res.body.upload.id as number, file };
  }

  async function plateMap() {
    const res = ok(await tech().post('/api/plate-maps').send({ name: `Matrix map ${nextSerial()}`, wells: plateWells }), 201, 'plate map');
    return { id: res.body.id as number, version: res.body.version as number };
  }

  let runDay = 0;
  /** A run plan with one specimen's CI total and background wells, no controls; one day later each call. */
  function runPlan(specimenId: number) {
    runDay += 1;
    const wells: RunWell[] = [
      { use: 'specimen', well: 'A1', specimenId, assay: 'CI', role: 'total', replicate: 1 },
      { use: 'specimen', well: 'A2', specimenId, assay: 'CI', role: 'background', replicate: 1 },
    ];
    return {
      instrument: 'Matrix reader (fictitious)',
      startedAt: new Date(Date.UTC(2026, 5, 1, 9, 0) + runDay * 86_400_000).toISOString(),
      plateFormat: 96,
      wells,
      pathlength: { mode: 'fill', volumeUl: 200, wellAreaCm2: 0.32 },
      reactionVolumeUl: 200,
      sampleVolumeUl: 10,
      controlProteinMgPerMl: {},
      windows: {},
    };
  }
  const sendRun = (agent: request.Agent, url: string, specimenId: number) =>
    agent.post(url).field('plan', JSON.stringify(runPlan(specimenId))).attach('file', plateFile(), 'matrix-run.csv');

  return {
    patient: () => createPatient(tech()),
    receivedCase: () => createCase(tech()),
    caseOf,
    caseWithProtein,
    caseWithAssays: () => createCaseWithAssays(tech(), { referringClinicianId: ctx.clinicianId() }),
    measurement,
    awaitingReview,
    signedCase,
    plateFile,
    sendPlate,
    plateUpload,
    plateMap,
    sendRun,
  };
}
export type Fixtures = ReturnType<typeof fixtures>;
