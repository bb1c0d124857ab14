import { criteriaRuleFor, defaultDiagnosticCriteria, type DiagnosticCriteria } from '@/schemas/assay';
import { specimenClassOf, type Measure } from '@/schemas/common';
import { bandThresholds } from '@/schemas/result-format';
import type { StoredInterval } from '@/schemas/reference-interval-api';
import type { ReportExcludedReplicate, ReportResult, ReportRun } from '@/schemas/report-document';
import type { RunQcStamp } from '@/schemas/run';
import type { AssayResult, CaseResults, ResultComparison, SpecimenResult } from '@/schemas/results';
import { findDefinitionById } from '../assay-definitions/assay-definitions.repository';
import { findIntervalById } from '../reference-intervals/reference-intervals.repository';
import { describeRunRelease } from '../runs/run-release';
import { describeDefinition, type ReportableResults } from './build-report-document';

/*
 * From the measurements engineer's CaseResults (frozen at submission) to the rows the report prints.
 * Nothing is recomputed here: every number, interval and band is copied as the snapshot holds it.
 */

const MEASURE_WORDS: Record<Measure, string> = { activity: 'activity', ratio_cs: 'ratio to CS', ratio_cii: 'ratio to CII' };

/** "Bernier FP et al. 2002": the first author and year of a citation, for captions. */
export function shortCitation(citation: string): string {
  const author = citation.split(',')[0]?.trim() ?? citation;
  const year = /\b(19|20)\d{2}\b/.exec(citation)?.[0];
  return year ? `${author} ${year}` : author;
}

export function criteriaFor(specimen: Pick<SpecimenResult, 'type'>, citation: string, criteria: DiagnosticCriteria = defaultDiagnosticCriteria) {
  const cellLine = specimenClassOf(specimen.type) === 'cell_line';
  const rule = criteriaRuleFor(specimen.type, criteria);
  return {
    majorBelowPct: rule.majorBelowPct,
    minorBelowPct: rule.minorBelowPct,
    ruleSetLabel: `${shortCitation(citation)} (${cellLine ? 'cell-line' : 'tissue'} thresholds: major below ${rule.majorBelowPct}%, minor below ${rule.minorBelowPct}% of the reference mean of the ${MEASURE_WORDS[criteria.appliesTo]})`,
  };
}

function row(
  a: AssayResult,
  c: ResultComparison,
  flags: string[],
  notes: string[],
  noInterval: string[],
  pctThresholds: number[],
): ReportResult | null {
  const what = `${a.assay} ${MEASURE_WORDS[c.measure]}`;
  if (!c.interval) {
    if (c.value === null) {
      notes.push(`${what}: no value.`);
      return null;
    }
    // Still reported (CLIA 493.1291(c)(6)): the value with its unit, printed as not compared.
    noInterval.push(what);
    return {
      assay: a.assay,
      assayName: a.name,
      measure: c.measure,
      value: c.value,
      unit: c.measure === 'activity' ? a.unit : 'ratio',
      referenceLower: null,
      referenceUpper: null,
      referenceMean: null,
      intervalLabel: null,
      intervalVersion: null,
      status: 'not_compared',
      pctOfMean: null,
      criterionBand: null,
      flags: [...new Set(flags.map((f) => f.trim()).filter((f) => f.length > 0))],
    };
  }
  const status = c.value === null || c.position === null ? 'not_compared' : c.position;
  return {
    assay: a.assay,
    assayName: a.name,
    measure: c.measure,
    value: c.value,
    unit: c.measure === 'activity' ? a.unit : 'ratio',
    referenceLower: c.interval.lower,
    referenceUpper: c.interval.upper,
    referenceMean: c.interval.mean,
    intervalLabel: c.interval.label,
    intervalVersion: Math.max(1, c.interval.version),
    status,
    pctOfMean: status === 'not_compared' ? null : c.percentOfMean,
    criterionBand: c.band === 'major' || c.band === 'minor' ? c.band : null,
    criterionBandNote: (c.band === 'major' || c.band === 'minor') && c.bandNote ? c.bandNote : null,
    pctThresholds,
    flags: [...new Set(flags.map((f) => f.trim()).filter((f) => f.length > 0))],
  };
}

function specimenRows(s: SpecimenResult, notes: string[]): ReportResult[] {
  const rows: ReportResult[] = [];
  const noInterval: string[] = [];
  // The same thresholds the screen prints with (src/schemas/result-format.ts).
  const pctThresholds = [...(bandThresholds(s.type, s.pattern?.criteria ?? defaultDiagnosticCriteria).below ?? [])];
  for (const a of s.assays) {
    const ratioMessages = new Set([...(a.ratioCs?.flags ?? []), ...(a.ratioCii?.flags ?? [])].map((f) => f.message));
    // Replicate and activity flags go with the activity row; each ratio row carries its own.
    const activityFlags = a.flags.map((f) => f.message).filter((m) => !ratioMessages.has(m));
    const activity = row(a, a.activity, activityFlags, notes, noInterval, pctThresholds);
    if (activity) rows.push(activity);
    for (const c of [a.ratioCs, a.ratioCii]) {
      if (!c) continue;
      const r = row(a, c, c.flags.map((f) => f.message), notes, noInterval, pctThresholds);
      if (r) rows.push(r);
    }
  }
  if (noInterval.length > 0) {
    notes.push(
      `No reference interval exists for this specimen type and age for ${noInterval.join(', ')}; these results are reported without comparison.`,
    );
  }
  return rows;
}

/** The runs the specimen's counted replicates came from, with the release of each run's quality control. */
function runsOf(s: SpecimenResult): ReportRun[] {
  const byRun = new Map<number, { stamp: RunQcStamp; assays: Set<string> }>();
  for (const a of s.assays) {
    for (const r of a.replicates) {
      if (r.excluded || !r.run) continue;
      const entry = byRun.get(r.run.runId) ?? { stamp: r.run, assays: new Set<string>() };
      entry.assays.add(a.assay);
      byRun.set(r.run.runId, entry);
    }
  }
  const label = s.label.trim() || String(s.specimenId);
  return [...byRun.values()].map(({ stamp, assays }) => ({
    runNumber: stamp.runNumber,
    qcStatus: stamp.qcStatus,
    overrideReason: stamp.overrideReason,
    results: `specimen ${label}: ${[...assays].join(', ')}`,
    statement: describeRunRelease(stamp),
  }));
}

/** The replicates left out of the specimen's calculations, as the methods section lists them. */
function excludedReplicatesOf(s: SpecimenResult): ReportExcludedReplicate[] {
  return s.assays.flatMap((a) =>
    a.replicates.flatMap((r) =>
      r.excluded
        ? [
            {
              specimenLabel: s.label.trim() || String(s.specimenId),
              assay: a.assay,
              replicate: r.replicate,
              value: r.activity,
              unit: a.unit,
              reason: r.excluded.reason,
              by: r.excluded.by?.trim() || 'an account no longer known',
            },
          ]
        : [],
    ),
  );
}

function patternSummaryOf(s: SpecimenResult): string | null {
  if (!s.pattern) return null;
  const sentence = (t: string) => (/[.!?]$/.test(t.trim()) ? t.trim() : `${t.trim()}.`);
  return [s.pattern.headline, ...s.pattern.notes].filter((t) => t.trim().length > 0).map(sentence).join(' ') || null;
}

/**
 * The reference intervals a specimen's comparisons used that were approved by the director who drafted them
 * (a single-director laboratory that allows it), named as the methods section prints them.
 */
async function selfApprovedIntervals(s: SpecimenResult, stored: StoredVersionReaders): Promise<string[]> {
  const ids = new Set(s.assays.flatMap((a) => [a.activity, a.ratioCs, a.ratioCii].flatMap((c) => (c?.interval ? [c.interval.id] : []))));
  const names: string[] = [];
  for (const id of ids) {
    const i = await stored.interval(id);
    if (i && i.approvedBy !== null && i.approvedBy === i.createdBy) names.push(`reference interval ${i.label}`);
  }
  return names;
}

/** Where the stored definition and interval versions are read (the database; a test without one passes its own). */
export type StoredVersionReaders = {
  definition: typeof findDefinitionById;
  interval: (id: number) => Promise<Pick<StoredInterval, 'label' | 'createdBy' | 'approvedBy'> | null>;
};
const fromDatabase: StoredVersionReaders = { definition: findDefinitionById, interval: (id) => findIntervalById(id) };

/** Every specimen's results in the report's shape, keyed by specimen id. */
export async function toReportableResults(
  caseResults: CaseResults,
  stored: StoredVersionReaders = fromDatabase,
): Promise<Map<number, ReportableResults>> {
  const descriptions = new Map<number, string>();
  const selfApprovedDefinitions = new Set<number>();
  for (const d of caseResults.definitions) {
    if (descriptions.has(d.id)) continue;
    const found = await stored.definition(d.id);
    descriptions.set(d.id, found ? describeDefinition(found.definition) : `${d.assay} assay definition version ${d.version}.`);
    if (found?.selfApproved) selfApprovedDefinitions.add(d.id);
  }
  const out = new Map<number, ReportableResults>();
  for (const s of caseResults.specimens) {
    const notes: string[] = [];
    const results = s.accepted ? specimenRows(s, notes) : [];
    const used = new Set(s.assays.flatMap((a) => a.replicates.map((r) => r.definitionId)));
    const definitions = caseResults.definitions
      .filter((d) => used.has(d.id))
      .map((d) => ({ assay: d.assay, version: Math.max(1, d.version), description: descriptions.get(d.id)! }));
    const citation = s.pattern?.criteriaCitation ?? defaultDiagnosticCriteria.citation;
    out.set(s.specimenId, {
      specimenId: s.specimenId,
      results,
      patternSummary: s.accepted ? patternSummaryOf(s) : null,
      findings: (s.pattern?.findings ?? []).map((f) => ({ kind: f.kind, label: f.label, complexes: f.complexes })),
      definitions,
      criteria: results.some((r) => r.measure !== 'activity') ? criteriaFor(s, citation, s.pattern?.criteria) : null,
      notes,
      selfApproved: [
        ...caseResults.definitions
          .filter((d) => used.has(d.id) && selfApprovedDefinitions.has(d.id))
          .map((d) => `${d.assay} assay definition version ${d.version}`),
        ...(s.accepted ? await selfApprovedIntervals(s, stored) : []),
      ],
      excludedReplicates: s.accepted ? excludedReplicatesOf(s) : [],
      runs: s.accepted ? runsOf(s) : [],
    });
  }
  return out;
}
