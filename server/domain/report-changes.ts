import type { ChangedValue, ReportDocument, ReportResult, ReportSpecimenSection } from '@/schemas/report-document';
import { intervalThresholds } from '@/schemas/result-format';
import { formatNumber, formatPercent } from './report-pdf/format';
import { BAND_WORDS, MEASURE_PHRASES, STATUS_WORDS, formatInterval } from './report-pdf/words';

/*
 * What a corrected report says changed: every value both versions print, compared as printed (so a difference
 * hidden by rounding is not announced, and one the reader can see always is). Pure: two documents in, rows out.
 */

type Section = Pick<ReportSpecimenSection, 'specimen' | 'results' | 'patternSummary'>;

/** The specimen sections of a stored document; documents signed before reports carried every specimen had one. */
function sectionsOf(doc: ReportDocument): Section[] {
  if (Array.isArray(doc.specimens)) return doc.specimens;
  const legacy = doc as unknown as { specimen?: Section['specimen']; results?: ReportResult[]; patternSummary?: string | null };
  return legacy.specimen ? [{ specimen: legacy.specimen, results: legacy.results ?? [], patternSummary: legacy.patternSummary ?? null }] : [];
}

const NOT_REPORTED = 'Not reported';

function printedValue(r: ReportResult | undefined): string {
  if (!r) return NOT_REPORTED;
  if (r.value === null) return 'No value';
  const number = formatNumber(r.value, r.decimals, intervalThresholds({ lower: r.referenceLower, upper: r.referenceUpper }));
  return `${number} ${r.unit}`;
}

function printedPercent(r: ReportResult | undefined): string {
  if (!r) return NOT_REPORTED;
  return r.pctOfMean === null ? 'None' : formatPercent(r.pctOfMean, { below: r.pctThresholds ?? [] });
}

/** The printed facets of one result row, in the order the corrected report lists them. */
const facets: Array<[string, (r: ReportResult | undefined) => string]> = [
  ['', printedValue],
  ['reference interval', (r) => (r ? formatInterval(r) : NOT_REPORTED)],
  ['% of ref. mean', printedPercent],
  ['compared with interval', (r) => (r ? STATUS_WORDS[r.status] : NOT_REPORTED)],
  ['criterion band', (r) => (r ? (r.criterionBand ? BAND_WORDS[r.criterionBand] : 'None') : NOT_REPORTED)],
];

function rowName(r: ReportResult): string {
  return `${r.assay} ${MEASURE_PHRASES[r.measure]}`;
}

function compareSection(before: Section | undefined, after: Section | undefined, label: string | null): ChangedValue[] {
  const out: ChangedValue[] = [];
  const key = (r: ReportResult) => `${r.assay}/${r.measure}`;
  const old = new Map((before?.results ?? []).map((r) => [key(r), r]));
  const now = new Map((after?.results ?? []).map((r) => [key(r), r]));
  const order = [...(after?.results ?? []), ...(before?.results ?? []).filter((r) => !now.has(key(r)))];
  for (const row of order) {
    const b = old.get(key(row));
    const a = now.get(key(row));
    for (const [facet, print] of facets) {
      const [was, is] = [print(b), print(a)];
      // A row missing on one side is said once, on its value line.
      if (was === is || (facet !== '' && (!a || !b))) continue;
      out.push({ specimen: label, item: facet ? `${rowName(row)}: ${facet}` : rowName(row), before: was, after: is });
    }
  }
  const [wasPattern, isPattern] = [before?.patternSummary ?? 'None', after?.patternSummary ?? 'None'];
  if (wasPattern !== isPattern) out.push({ specimen: label, item: 'Pattern', before: wasPattern, after: isPattern });
  return out;
}

/**
 * Every printed value of `next` that differs from `previous`, specimen by specimen (matched by label, else by
 * position). The specimen is named only when the case has more than one.
 */
export function changedValuesBetween(previous: ReportDocument, next: ReportDocument): ChangedValue[] {
  const was = sectionsOf(previous);
  const is = sectionsOf(next);
  const several = Math.max(was.length, is.length) > 1;
  const find = (list: Section[], s: Section, i: number) =>
    s.specimen.label !== undefined ? list.find((x) => x.specimen.label === s.specimen.label) : list[i];
  const pairs: Array<[Section | undefined, Section | undefined, Section]> = is.map((s, i) => [find(was, s, i), s, s]);
  was.forEach((s) => {
    if (!pairs.some(([b]) => b === s)) pairs.push([s, undefined, s]);
  });
  return pairs.flatMap(([b, a, s], i) => compareSection(b, a, several ? (s.specimen.label ?? String(i + 1)) : null));
}
