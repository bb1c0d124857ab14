import type request from 'supertest';
import { storedAssayDefinitionSchema, type AssayDefinition } from '@/schemas/assay';
import type { CaseDetail, RegisterCaseInput } from '@/schemas/case';
import type { AssayCode } from '@/schemas/common';
import { createCase } from './cases';
import { assert40UgCuvette, typedRates } from './published-factors';

type Agent = request.Agent;

/*
 * A whole workup through the laboratory's own API, as a technologist does it: register the case, record the
 * protein, type one rate per assay, submit for review. Rates are worked back from the wanted activity with the
 * consensus calculation factors for 40 µg protein in a 1 mL, 1 cm cuvette (./published-factors.ts, hand-worked
 * literals, never recomputed from the definition), so a wrong ε or Beer–Lambert factor in the server shows.
 * All values are invented fixtures.
 */

const CONDITIONS = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 20 } as const;
const PROTEIN_MG_PER_ML = 2;

/** An invented muscle profile with complex I low against CS and CII (isolated complex I pattern). */
export const isolatedComplexI: Record<AssayCode, number> = {
  CS: 150,
  CI: 6,
  CII: 30,
  CIII: 120,
  CIV: 180,
  'CI+III': 14,
  'CII+III': 40,
};

/** An invented muscle profile near the demo reference means (no deficiency pattern). */
export const nearMeans: Record<AssayCode, number> = {
  CS: 150,
  CI: 37,
  CII: 30,
  CIII: 120,
  CIV: 180,
  'CI+III': 45,
  'CII+III': 40,
};

function check(res: request.Response, status: number, what: string): void {
  if (res.status !== status) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
}

/** The protein every workup of this factory records (mg/mL). */
export const WORKUP_PROTEIN_MG_PER_ML = PROTEIN_MG_PER_ML;

/**
 * Typed rates that give `wanted` nmol/min/mg under the published factors (background 0 where the assay subtracts
 * one). The definition is only named: its ε must be the published one the factors were worked from.
 */
export function ratesFor(def: AssayDefinition, wanted: number, specimenId: number, replicate: number) {
  assert40UgCuvette(CONDITIONS, PROTEIN_MG_PER_ML);
  return { specimenId, assay: def.code, replicate, mode: 'rates' as const, ...CONDITIONS, ...typedRates(def.code, wanted) };
}

/** The current assay definitions, read through the API. */
export async function currentDefinitions(agent: Agent): Promise<AssayDefinition[]> {
  const defsRes = await agent.get('/api/assay-definitions');
  check(defsRes, 200, 'assay definitions');
  return (defsRes.body.items as unknown[]).map((d) => storedAssayDefinitionSchema.parse(d).definition);
}

type WorkupOptions = { referringClinicianId: number; activities?: Record<AssayCode, number>; overrides?: Partial<RegisterCaseInput> };

/** Registers a case, records its protein and enters one rate per assay; returns the case as it is before submission. */
export async function createCaseWithAssays(tech: Agent, opts: WorkupOptions): Promise<CaseDetail> {
  const created = await createCase(tech, { referringClinicianId: opts.referringClinicianId, ...opts.overrides });
  const specimen = created.specimens[0]!;
  check(
    await tech
      .put(`/api/specimens/${specimen.id}/protein`)
      .send({ kind: 'direct', proteinMgPerMl: PROTEIN_MG_PER_ML, proteinSource: 'BCA assay (fixture)', version: specimen.version }),
    200,
    'protein',
  );
  const defs = await currentDefinitions(tech);
  const activities = opts.activities ?? isolatedComplexI;
  for (const def of defs) {
    const res = await tech.post(`/api/cases/${created.id}/measurements`).send(ratesFor(def, activities[def.code], specimen.id, 1));
    check(res, 201, `measurement ${def.code}`);
  }
  const current = await tech.get(`/api/cases/${created.id}`);
  check(current, 200, 'case');
  return current.body as CaseDetail;
}

/** Registers a case, enters its assays and submits it; returns the case as it awaits review. */
export async function createCaseAwaitingReview(tech: Agent, opts: WorkupOptions): Promise<CaseDetail> {
  const current = await createCaseWithAssays(tech, opts);
  check(await tech.post(`/api/cases/${current.id}/submit`).send({ version: current.version }), 200, 'submit');
  const after = await tech.get(`/api/cases/${current.id}`);
  check(after, 200, 'case after submit');
  return after.body as CaseDetail;
}

/** The id of a demo account, looked up through the admin API. */
export async function accountId(admin: Agent, email: string): Promise<number> {
  const res = await admin.get('/api/users');
  check(res, 200, 'users');
  const found = (res.body.items as { id: number; email: string }[]).find((u) => u.email === email);
  if (!found) throw new Error(`no account ${email}`);
  return found.id;
}
