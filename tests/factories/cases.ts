import type request from 'supertest';
import {
  caseDetailSchema,
  createPatientInputSchema,
  patientSchema,
  receiveSpecimenInputSchema,
  registerCaseInputSchema,
  type CaseDetail,
  type CreatePatientInput,
  type Patient,
  type ReceiveSpecimenInput,
  type RegisterCaseInput,
} from '@/schemas/case';

type Agent = request.Agent;

/* Deterministic counters, not randomness: every run builds the same records in the same order. */
let seq = 0;
const next = () => (seq += 1);
/** 1 -> "a", 26 -> "z", 27 -> "aa": letters only, so generated names stay valid names. */
function letters(n: number): string {
  let s = '';
  for (let i = n; i > 0; i = Math.floor((i - 1) / 26)) s = String.fromCharCode(97 + ((i - 1) % 26)) + s;
  return s;
}

export function buildPatientInput(overrides: Partial<CreatePatientInput> = {}): CreatePatientInput {
  const n = next();
  return createPatientInputSchema.parse({
    labPatientId: `FX-${String(n).padStart(5, '0')}`,
    familyName: `Fixturson${letters(n)}`,
    givenName: 'Alba',
    dateOfBirth: '2014-06-01',
    sex: 'female',
    ...overrides,
  });
}

/** An accepted skeletal-muscle specimen received an hour ago (UTC instants, so no zone is involved). */
export function buildSpecimenInput(overrides: Partial<ReceiveSpecimenInput> = {}): ReceiveSpecimenInput {
  const received = new Date(Date.now() - 60 * 60_000);
  return receiveSpecimenInputSchema.parse({
    type: 'skeletal_muscle',
    source: 'Vastus lateralis, needle biopsy',
    collectedAt: new Date(received.getTime() - 20 * 60 * 60_000).toISOString(),
    receivedAt: received.toISOString(),
    transportCondition: 'dry_ice',
    wetWeightMg: 45,
    accepted: true,
    rejectionReason: null,
    ...overrides,
  });
}

export function buildRegisterCaseInput(
  patientId: number,
  referringClinicianId: number,
  overrides: Partial<RegisterCaseInput> = {},
): RegisterCaseInput {
  return registerCaseInputSchema.parse({
    patientId,
    referringClinicianId,
    clinicalIndication: 'Hypotonia and raised lactate; fixture case',
    priority: 'routine',
    specimen: buildSpecimenInput(),
    ...overrides,
  });
}

export async function clinicianIds(agent: Agent): Promise<number[]> {
  const res = await agent.get('/api/clinicians');
  if (res.status !== 200) throw new Error(`clinicians: ${res.status}`);
  return (res.body.items as { id: number }[]).map((u) => u.id);
}

/** Registers a patient through the API. */
export async function createPatient(agent: Agent, overrides: Partial<CreatePatientInput> = {}): Promise<Patient> {
  const res = await agent.post('/api/patients').send(buildPatientInput(overrides));
  if (res.status !== 201) throw new Error(`create patient: ${res.status} ${JSON.stringify(res.body)}`);
  return patientSchema.parse(res.body);
}

/** Registers a new patient and a case for them through the API. */
export async function createCase(
  agent: Agent,
  overrides: Partial<RegisterCaseInput> & { patient?: Partial<CreatePatientInput> } = {},
): Promise<CaseDetail> {
  const { patient: patientOverrides, ...caseOverrides } = overrides;
  const patient = caseOverrides.patientId ? null : await createPatient(agent, patientOverrides);
  const [clinician] = await clinicianIds(agent);
  const input = buildRegisterCaseInput(patient?.id ?? caseOverrides.patientId!, clinician!, caseOverrides);
  const res = await agent.post('/api/cases').send(input);
  if (res.status !== 201) throw new Error(`create case: ${res.status} ${JSON.stringify(res.body)}`);
  return caseDetailSchema.parse(res.body);
}
