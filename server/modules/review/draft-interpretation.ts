import type { PatternKind } from '@/schemas/assay';
import { specimenClassOf, specimenTypeLabels, type AssayCode, type SpecimenType } from '@/schemas/common';
import type { ReportResult } from '@/schemas/report-document';
import { formatPercentOfMean } from '@/schemas/result-format';

/*
 * Cristae's proposed wording for the interpretation: plain sentences that restate the numbers, the pattern
 * and the criterion bands, and stop there. It never names a disease; the director edits it, and only the
 * director's text is signed. Bands follow the director-approved rule set (Bernier FP et al., Neurology
 * 2002;59:1406–1411 [from memory], as configured), shown as bands, never as a diagnosis.
 */

export type DraftFinding = { kind: PatternKind; label: string; complexes: AssayCode[] };

export type DraftInput = {
  specimenType: SpecimenType;
  accepted: boolean;
  rejectionReason: string | null;
  results: readonly ReportResult[];
  findings: readonly DraftFinding[];
  /** Label of the rule set the bands come from; null when no bands were computed. */
  criteriaLabel: string | null;
};

const NAMES: Record<AssayCode, string> = {
  CI: 'complex I',
  CII: 'complex II',
  CIII: 'complex III',
  CIV: 'complex IV',
  'CI+III': 'complex I+III (NADH:cytochrome c reductase)',
  'CII+III': 'complex II+III (succinate:cytochrome c reductase)',
  CS: 'citrate synthase',
};

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** A row's % of the reference mean, printed as on the screen and the report (never across a band threshold). */
function formatPct(r: ReportResult): string {
  return formatPercentOfMean(r.pctOfMean ?? Number.NaN, { below: r.pctThresholds ?? [] });
}

function find(results: readonly ReportResult[], assay: AssayCode, measure: ReportResult['measure']): ReportResult | undefined {
  return results.find((r) => r.assay === assay && r.measure === measure);
}

const POSITION: Record<ReportResult['status'], string> = {
  below: 'below its reference interval',
  within: 'within its reference interval',
  above: 'above its reference interval',
  not_compared: 'not compared with a reference interval',
};

function bandPhrase(r: ReportResult): string {
  if (r.criterionBand === 'major') return ', in the major-criterion band';
  if (r.criterionBand === 'minor') return ', in the minor-criterion band';
  return '';
}

/** "Complex I activity relative to citrate synthase is 18% of the reference mean, in the major-criterion band". */
function ratioClause(r: ReportResult | undefined, relativeTo: 'citrate synthase' | 'complex II'): string | null {
  if (!r || r.value === null) return null;
  if (r.pctOfMean === null) return `relative to ${relativeTo} it is ${POSITION[r.status]}`;
  return `relative to ${relativeTo} it is ${formatPct(r)} of the reference mean (${POSITION[r.status]}${bandPhrase(r)})`;
}

function complexSentence(results: readonly ReportResult[], assay: AssayCode): string | null {
  const toCs = ratioClause(find(results, assay, 'ratio_cs'), 'citrate synthase');
  const toCii = assay === 'CII' ? null : ratioClause(find(results, assay, 'ratio_cii'), 'complex II');
  const clauses = [toCs, toCii].filter((c): c is string => c !== null);
  if (clauses.length === 0) return null;
  return `${capitalise(NAMES[assay])} activity: ${clauses.join('; ')}.`;
}

function ciiSentence(results: readonly ReportResult[]): string | null {
  const r = find(results, 'CII', 'ratio_cs');
  if (!r || r.value === null) return null;
  const pct = r.pctOfMean === null ? '' : `, ${formatPct(r)} of the reference mean`;
  return `Complex II relative to citrate synthase is ${POSITION[r.status]}${pct}.`;
}

function csSentence(results: readonly ReportResult[]): string | null {
  const r = find(results, 'CS', 'activity');
  if (!r || r.value === null) return null;
  const pct = r.pctOfMean === null ? '' : ` (${formatPct(r)} of the reference mean)`;
  return `Citrate synthase activity, a marker of mitochondrial content, is ${POSITION[r.status]}${pct}.`;
}

function listNames(codes: readonly AssayCode[]): string {
  const names = codes.map((c) => NAMES[c]);
  return names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** Paragraphs of the proposed interpretation. */
export function proposeInterpretation(input: DraftInput): string {
  const tissue = specimenTypeLabels[input.specimenType].toLowerCase();
  if (!input.accepted) {
    return [
      `The ${tissue} specimen was rejected on receipt${input.rejectionReason ? ` (${input.rejectionReason.replace(/\.$/, '')})` : ''}, so no enzyme activities were measured.`,
      'A new specimen, collected and shipped as the laboratory’s instructions describe, is needed before respiratory-chain enzyme activities can be reported.',
    ].join('\n\n');
  }
  const { results, findings } = input;
  const paragraphs: string[] = [];
  const kinds = new Set(findings.map((f) => f.kind));

  if (kinds.has('insufficient_data') || results.length === 0) {
    paragraphs.push(
      'Not enough activities could be compared relative to citrate synthase to describe a pattern. The results in the table are reported as measured.',
    );
  }
  for (const f of findings) {
    if (f.kind === 'isolated_deficiency') {
      const x = f.complexes[0];
      if (!x) continue;
      const lines = [complexSentence(results, x), x === 'CII' ? null : ciiSentence(results)].filter(Boolean);
      lines.push(`The pattern is of isolated low ${NAMES[x]} activity in this ${tissue} specimen.`);
      paragraphs.push(lines.join(' '));
    } else if (f.kind === 'combined_deficiency') {
      const lines = f.complexes.map((x) => complexSentence(results, x)).filter(Boolean);
      lines.push(`More than one complex is low relative to citrate synthase (${listNames(f.complexes)}).`);
      paragraphs.push(lines.join(' '));
    } else if (f.kind === 'linked_activity_low') {
      const lines = f.complexes.map((x) => complexSentence(results, x)).filter(Boolean);
      lines.push('Each single complex measured on its own is within its reference interval relative to citrate synthase.');
      paragraphs.push(lines.join(' '));
    } else if (f.kind === 'raised_cs') {
      const cs = csSentence(results);
      paragraphs.push(
        [
          cs,
          f.label.includes('possible mitochondrial proliferation')
            ? 'With the ratios to citrate synthase within their intervals, this may reflect an increased mitochondrial content of the specimen.'
            : 'Ratios to citrate synthase are lowered by the raised citrate synthase as well as by any lower activity of the complexes, and are read with that in mind.',
        ]
          .filter(Boolean)
          .join(' '),
      );
    } else if (f.kind === 'normal') {
      paragraphs.push(
        [
          `The activities of complexes I, II, III and IV relative to citrate synthase and to complex II are within their reference intervals in this ${tissue} specimen.`,
          csSentence(results),
        ]
          .filter(Boolean)
          .join(' '),
      );
    }
  }
  if (!kinds.has('raised_cs') && !kinds.has('normal')) {
    const cs = csSentence(results);
    if (cs) paragraphs.push(cs);
  }

  const unexplained = [...new Set(results.flatMap((r) => (r.criterionBand && r.criterionBandNote ? [r.criterionBandNote] : [])))];
  if (unexplained.length > 0) {
    paragraphs.push(unexplained.map((n) => `${capitalise(n)}.`).join(' '));
  }
  const banded = results.filter((r) => r.criterionBand !== null);
  if (banded.length > 0 && input.criteriaLabel) {
    paragraphs.push(
      `Criterion bands refer to the enzyme criteria of ${input.criteriaLabel}. A band describes the size of a reduction; on its own it is not a diagnosis.`,
    );
  }
  const closing = [
    'These enzyme results are to be read together with the clinical findings, the specimen’s collection and handling, and any genetic results.',
  ];
  if (specimenClassOf(input.specimenType) === 'cell_line') {
    closing.push('Activities in cultured cells vary between cultures, and a defect expressed only in other tissues may not show in cells.');
  }
  paragraphs.push(closing.join(' '));
  return paragraphs.join('\n\n');
}
