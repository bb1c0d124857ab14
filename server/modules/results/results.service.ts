import type { Sequelize, Transaction } from 'sequelize';
import { defaultAssayDefinitions, type ComparisonInterval, type Flag, type StoredAssayDefinition } from '@/schemas/assay';
import type { CaseState, Specimen } from '@/schemas/case';
import { assayCodes, type AssayCode, type Measure } from '@/schemas/common';
import type { Measurement } from '@/schemas/measurement';
import {
  caseResultsSchema,
  patternCodeOf,
  type AssayResult,
  type CaseResults,
  type ResultComparison,
  type SpecimenResult,
  type SubmitCaseInput,
  type UsedInterval,
} from '@/schemas/results';
import type { RunQcStamp } from '@/schemas/run';
import type { User } from '@/schemas/user';
import type { Comparison } from '../../domain/assay-engine/compare';
import { computeRatios, ratioToCiiAssays, ratioToCsAssays, type ActivityMap } from '../../domain/assay-engine/normalise';
import { summarisePattern } from '../../domain/assay-engine/pattern';
import { summariseReplicates } from '../../domain/assay-engine/replicates';
import { invalidState, notFound } from '../../lib/errors';
import { findDefinitionById } from '../assay-definitions/assay-definitions.service';
import { transitionCase } from '../cases/case-state';
import { findCaseById, type CaseRecord } from '../cases/cases.repository';
import { writeTransaction } from '../../db/write-transaction';
import { listMeasurementsOfCase, markSubmitted } from '../measurements/measurements.repository';
import { findPatientById } from '../patients/patients.repository';
import { findApplicableInterval, toComparisonInterval } from '../reference-intervals/reference-intervals.service';
import { listSpecimensOfCase } from '../specimens/specimens.repository';
import { readResultsSnapshot, writeResultsSnapshot } from './results.repository';
import { qcNotAccepted, runReleased } from '../runs/run-release';
import { runStampsOfMeasurements } from '../runs/runs.repository';

/** States in which results are computed live from the measurements; afterwards they are read from the snapshot. */
const liveStates: readonly CaseState[] = ['received', 'in_assay'];

const PATTERN_CODE_MAX = 40;

/**
 * Age in years at an instant, from a date of birth (YYYY-MM-DD): whole years by the calendar, plus the
 * fraction of the current year of life, so band limits such as 16 years fall on the birthday.
 */
export function ageInYears(dateOfBirth: string, at: Date): number | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(dateOfBirth);
  if (!m) return null;
  const [y, mo, d] = [Number(m[1]), Number(m[2]) - 1, Number(m[3])];
  const birthday = (year: number) => Date.UTC(year, mo, d);
  const t = at.getTime();
  if (t < birthday(y)) return null;
  let years = at.getUTCFullYear() - y;
  if (t < birthday(y + years)) years -= 1;
  const last = birthday(y + years);
  const next = birthday(y + years + 1);
  return years + (t - last) / (next - last);
}

const assayNames = new Map(defaultAssayDefinitions.map((d) => [d.code, d.name]));

function dedupeFlags(flags: Flag[]): Flag[] {
  const seen = new Set<string>();
  return flags.filter((f) => (seen.has(f.message) ? false : (seen.add(f.message), true)));
}

function usedInterval(c: Comparison | undefined, stored: Map<string, UsedInterval>): UsedInterval | null {
  return c?.interval ? (stored.get(c.interval.id) ?? null) : null;
}

function toResultComparison(
  measure: Measure,
  value: number | null,
  c: Comparison | undefined,
  stored: Map<string, UsedInterval>,
  extraFlags: Flag[] = [],
): ResultComparison {
  return {
    measure,
    value: c ? c.value : value,
    interval: usedInterval(c, stored),
    position: c?.position ?? null,
    percentOfMean: c?.percentOfMean ?? null,
    zScore: c?.zScore ?? null,
    band: c?.band ?? null,
    bandNote: c?.bandNote ?? null,
    flags: dedupeFlags([...extraFlags, ...(c?.flags ?? [])]),
  };
}

type Definitions = Map<number, StoredAssayDefinition>;

async function definitionOf(id: number, cache: Definitions): Promise<StoredAssayDefinition> {
  let d = cache.get(id);
  if (!d) {
    d = (await findDefinitionById(id)) ?? undefined;
    if (!d) throw notFound('Assay definition', id);
    cache.set(id, d);
  }
  return d;
}

async function specimenResults(
  specimen: Specimen,
  measurements: Measurement[],
  dateOfBirth: string,
  at: Date,
  definitions: Definitions,
  runStamps: Map<number, RunQcStamp>,
): Promise<SpecimenResult> {
  const collected = new Date(specimen.collectedAt ?? specimen.receivedAt);
  const ageYears = ageInYears(dateOfBirth, collected);
  const base = {
    specimenId: specimen.id,
    label: specimen.label,
    type: specimen.type,
    accepted: specimen.accepted,
    rejectionReason: specimen.rejectionReason,
    collectedAt: specimen.collectedAt,
    receivedAt: specimen.receivedAt,
    ageYears,
    proteinMgPerMl: specimen.proteinMgPerMl,
    proteinSource: specimen.proteinSource,
  };
  const mine = measurements.filter((m) => m.specimenId === specimen.id);
  if (!specimen.accepted || mine.length === 0) return { ...base, assays: [], pattern: null };

  const byAssay = new Map<AssayCode, Measurement[]>();
  for (const m of mine) byAssay.set(m.assay, [...(byAssay.get(m.assay) ?? []), m]);
  const present = assayCodes.filter((a) => byAssay.has(a));

  const activities: ActivityMap = {};
  const summaries = new Map<AssayCode, ReturnType<typeof summariseReplicates>>();
  for (const assay of present) {
    const reps = byAssay.get(assay)!.sort((a, b) => a.replicate - b.replicate);
    const latest = reps.reduce((x, y) => (y.definitionVersion > x.definitionVersion ? y : x));
    const cvLimit = (await definitionOf(latest.definitionId, definitions)).definition.cvLimitPct;
    // An excluded replicate stays listed but counts in nothing: mean, SD, CV, ratios and pattern.
    const summary = summariseReplicates(
      reps.filter((r) => !r.excluded).map((r) => r.activity),
      cvLimit,
    );
    summaries.set(assay, summary);
    activities[assay] = summary.mean;
  }

  // The approved interval in force now for every value the pattern will compare.
  const stored = new Map<string, UsedInterval>();
  const intervals: ComparisonInterval[] = [];
  const wanted: [AssayCode, Measure][] = [];
  for (const assay of present) {
    wanted.push([assay, 'activity']);
    if ((ratioToCsAssays as readonly AssayCode[]).includes(assay)) wanted.push([assay, 'ratio_cs']);
    if ((ratioToCiiAssays as readonly AssayCode[]).includes(assay)) wanted.push([assay, 'ratio_cii']);
  }
  for (const [assay, measure] of wanted) {
    const found = await findApplicableInterval({ assay, measure, specimenType: specimen.type, ageYears, at });
    if (!found) continue;
    const ci = toComparisonInterval(found);
    // The stored label already ends in "· vN"; the pattern's evidence text adds the version itself.
    intervals.push({ ...ci, setLabel: ci.setLabel.replace(/ · v\d+$/, '') });
    stored.set(ci.id, {
      id: found.id,
      version: found.version,
      label: ci.setLabel,
      lower: found.lower,
      upper: found.upper,
      mean: found.mean,
      sd: found.sd,
      unit: found.unit,
      method: found.method,
      basis: found.basis,
    });
  }

  const summary = summarisePattern({ specimenType: specimen.type, ageYears, activities, intervals });
  const comparisons = new Map(summary.comparisons.map((c) => [`${c.assay}:${c.measure}`, c]));
  const ratioFlags = new Map(computeRatios(activities).map((r) => [`${r.assay}:${r.measure}`, r.flags]));

  const assays: AssayResult[] = present.map((assay) => {
    const reps = byAssay.get(assay)!;
    const s = summaries.get(assay)!;
    const activity = toResultComparison('activity', s.mean, comparisons.get(`${assay}:activity`), stored);
    const ratio = (measure: 'ratio_cs' | 'ratio_cii', applies: boolean) =>
      applies
        ? toResultComparison(
            measure,
            null,
            comparisons.get(`${assay}:${measure}`),
            stored,
            (ratioFlags.get(`${assay}:${measure}`) ?? []).filter((f) => f.code === 'NO_DENOMINATOR'),
          )
        : null;
    const ratioCs = ratio('ratio_cs', (ratioToCsAssays as readonly AssayCode[]).includes(assay));
    const ratioCii = ratio('ratio_cii', (ratioToCiiAssays as readonly AssayCode[]).includes(assay));
    const replicateFlags = reps
      .filter((r) => !r.excluded)
      .flatMap((r) => r.flags.map((f) => ({ code: f.code, message: `Replicate ${r.replicate}: ${f.message}` })));
    return {
      assay,
      name: assayNames.get(assay) ?? assay,
      unit: reps[0]!.result.unit,
      replicates: reps.map((r) => ({
        measurementId: r.id,
        replicate: r.replicate,
        inputMode: r.inputMode,
        activity: r.activity,
        specificSlopePerMin: r.result.specificSlopePerMin,
        r2: r.result.r2,
        window: r.result.window,
        definitionId: r.definitionId,
        definitionVersion: r.definitionVersion,
        flags: r.flags,
        excluded: r.excluded,
        run: runStamps.get(r.id) ?? null,
      })),
      n: s.n,
      mean: s.mean,
      sd: s.sd,
      cvPct: s.cvPct,
      activity,
      ratioCs,
      ratioCii,
      flags: dedupeFlags([
        ...replicateFlags,
        ...s.flags,
        ...activity.flags,
        ...(ratioCs?.flags ?? []),
        ...(ratioCii?.flags ?? []),
      ]),
    };
  });

  const findings = summary.findings.map((f) => ({
    kind: f.kind,
    label: f.label,
    complexes: f.complexes,
    evidence: f.evidence.map((e) => {
      const used = stored.get(e.intervalId)!;
      return {
        assay: e.assay,
        measure: e.measure,
        value: e.value,
        intervalId: used.id,
        intervalVersion: used.version,
        intervalLabel: used.label,
        lower: e.lower,
        upper: e.upper,
        mean: e.mean,
        position: e.position,
        percentOfMean: e.percentOfMean,
        band: e.band,
        text: e.text,
      };
    }),
  }));
  return {
    ...base,
    assays,
    pattern: {
      code: patternCodeOf(findings),
      headline: summary.headline,
      findings,
      notes: [...new Set(summary.notes)],
      criteriaCitation: summary.criteriaCitation,
      criteria: summary.criteria,
    },
  };
}

function caseContext(c: CaseRecord): Pick<CaseResults, 'caseId' | 'accession' | 'state' | 'caseVersion' | 'returnReason'> {
  return { caseId: c.id, accession: c.accession, state: c.state, caseVersion: c.version, returnReason: c.returnReason };
}

/** Results computed now from the measurements, with the approved intervals in force today. */
export async function computeCaseResults(caseId: number, transaction?: Transaction, at: Date = new Date()): Promise<CaseResults> {
  const c = await findCaseById(caseId, transaction);
  if (!c) throw notFound('Case', caseId);
  const patient = await findPatientById(c.patientId, transaction);
  if (!patient) throw notFound('Patient', c.patientId);
  const [specimens, measurements] = await Promise.all([
    listSpecimensOfCase(caseId, transaction),
    listMeasurementsOfCase(caseId, transaction),
  ]);
  const definitions: Definitions = new Map();
  const runStamps = await runStampsOfMeasurements(measurements.map((m) => m.id), transaction);
  const specimenResultsList: SpecimenResult[] = [];
  for (const s of specimens) {
    specimenResultsList.push(await specimenResults(s, measurements, patient.dateOfBirth, at, definitions, runStamps));
  }

  const codes = [...new Set(specimenResultsList.map((s) => s.pattern?.code).filter((x): x is string => !!x))];
  const used = new Map<string, { assay: AssayCode; id: number; version: number }>();
  for (const m of measurements) used.set(`${m.assay}|${m.definitionId}`, { assay: m.assay, id: m.definitionId, version: m.definitionVersion });
  return {
    ...caseContext(c),
    frozen: false,
    computedAt: at.toISOString(),
    patternCode: codes.length ? codes.join('; ').slice(0, PATTERN_CODE_MAX) : null,
    specimens: specimenResultsList,
    definitions: [...used.values()].sort((a, b) => assayCodes.indexOf(a.assay) - assayCodes.indexOf(b.assay) || a.version - b.version),
    intervalsAsOf: at.toISOString().slice(0, 10),
  };
}

/**
 * The results of a case: read from the snapshot frozen at submission once the case has left the assay stage,
 * computed live from the measurements before that (`frozen` says which).
 */
export async function getCaseResults(caseId: number): Promise<CaseResults> {
  const c = await findCaseById(caseId);
  if (!c) throw notFound('Case', caseId);
  if (!liveStates.includes(c.state)) {
    const text = await readResultsSnapshot(caseId);
    if (text) return { ...caseResultsSchema.parse(JSON.parse(text)), ...caseContext(c), frozen: true };
  }
  return computeCaseResults(caseId);
}

/**
 * The technologist hands the case to the director: results frozen into the snapshot with the pattern code,
 * and the state moved to awaiting review, in one transaction.
 */
export async function submitCaseForReview(
  sequelize: Sequelize,
  actor: User,
  caseId: number,
  input: SubmitCaseInput,
): Promise<CaseResults> {
  return writeTransaction(sequelize, async (t) => {
    const c = await findCaseById(caseId, t);
    if (!c) throw notFound('Case', caseId);
    const results = await computeCaseResults(caseId, t);
    // Every specimen rejected on receipt: there is nothing to assay, but the rejection and its reason must
    // still reach the requester in a signed report (CLIA 42 CFR 493.1291(c)(7) [confirmed]).
    const allRejected = results.specimens.length > 0 && results.specimens.every((s) => !s.accepted);
    if (c.state !== 'in_assay' && !(c.state === 'received' && allRejected)) {
      throw invalidState(
        c.state === 'received'
          ? `Case ${c.accession} has no assay results yet: enter them before submitting it for review.`
          : `Case ${c.accession} is not in assay, so it cannot be submitted for review.`,
      );
    }
    if (!allRejected && !results.specimens.some((s) => s.assays.length > 0)) {
      throw invalidState(`Case ${c.accession} has no assay results yet: enter them before submitting it for review.`);
    }
    // Release gate: no replicate that counts may come from a run whose controls were rejected or not evaluated,
    // unless a director released that run (CLIA 42 CFR 493.1256 [from memory]; a 1-2s warning passes).
    const held = results.specimens
      .flatMap((s) => s.assays.flatMap((a) => a.replicates))
      .flatMap((r) => (!r.excluded && r.run && !runReleased(r.run) ? [r.run.runNumber] : []));
    if (held.length > 0) throw qcNotAccepted(c.accession, [...new Set(held)].sort());
    let version = input.version;
    if (c.state === 'received') {
      version = (await transitionCase(sequelize, actor, caseId, 'in_assay', { version }, t)).version;
    }
    const frozen: CaseResults = { ...results, frozen: true };
    await writeResultsSnapshot(caseId, JSON.stringify(frozen), results.patternCode, t);
    // From now on these measurements can be excluded with a reason, never deleted.
    await markSubmitted(caseId, new Date(), t);
    const after = await transitionCase(sequelize, actor, caseId, 'awaiting_review', { version }, t);
    return { ...frozen, state: after.state, caseVersion: after.version, returnReason: after.returnReason };
  });
}
