import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { beforeAll, describe, expect, it } from 'vitest';
import type { AssayCode, Measure } from '@/schemas/common';
import type { AssayResult, CaseResults, ResultComparison } from '@/schemas/results';
import { ResultsView } from '@/features/results/components/results-view';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import { toReportableResults } from '../../../../server/modules/reports/results-adapter';
import { buildReportDocument, muscleSection } from '../../../factories/report-document';
import { collapse, readPdf, type ReadPdf } from '../../../factories/pdf-text';

/*
 * The results screen and the signed report print the same figures for the same frozen results, and no
 * printed figure contradicts its band or its interval position. The screen is rendered with react-dom's
 * server renderer; the report is rendered and read back with pdfjs-dist, an independent PDF reader.
 * Bands: Bernier FP et al., Neurology 2002;59:1406–1411 [from memory] — tissue major < 20%, minor 20–30%
 * of the reference mean, decided on the unrounded value. Values and intervals are invented (demo).
 */

const band = (pct: number) => (pct < 20 ? 'major' : pct < 30 ? 'minor' : 'not_met');

function cmp(measure: Measure, value: number, [lower, upper, mean]: [number, number, number], banded: boolean, bandNote: string | null = null): ResultComparison {
  const pct = (100 * value) / mean;
  return {
    measure,
    value,
    interval: { id: 1, version: 1, label: 'Muscle controls (demo) · all ages', lower, upper, mean, sd: null, unit: measure === 'activity' ? 'nmol/min/mg protein' : 'ratio', method: 'mean ± 2 SD (demo)', basis: 'linear_rate' },
    position: value < lower ? 'below' : value > upper ? 'above' : 'within',
    percentOfMean: pct,
    zScore: null,
    band: banded ? band(pct) : null,
    bandNote,
    flags: [],
  };
}

function assay(code: AssayCode, activity: ResultComparison, ratioCs: ResultComparison | null, ratioCii: ResultComparison | null): AssayResult {
  return { assay: code, name: code, unit: 'nmol/min/mg protein', replicates: [], n: 1, mean: activity.value, sd: null, cvPct: null, activity, ratioCs, ratioCii, flags: [] };
}

const CIII_NOTE =
  'CIII/CS (20% of the reference mean) is in the minor band of the criteria, but the pattern shows no deficiency of complex III: fixture reason (demo)';

// CI/CS 0.0499 of mean 0.25 = 19.96% (major); CIII/CS 0.1616 of mean 0.8 = 20.2% (minor); CI/CII 0.2495 of
// mean 1.25 = 19.96% (no band under the default rule); CII/CS 0.11996 just under its lower limit 0.12 [derived].
const results: CaseResults = {
  caseId: 1,
  accession: 'DEMO-0001',
  state: 'awaiting_review',
  caseVersion: 1,
  returnReason: null,
  frozen: true,
  computedAt: '2025-03-14T09:00:00Z',
  patternCode: 'isolated:CI',
  definitions: [],
  intervalsAsOf: '2025-03-14',
  specimens: [
    {
      specimenId: 7,
      label: 'A',
      type: 'skeletal_muscle',
      accepted: true,
      rejectionReason: null,
      collectedAt: null,
      receivedAt: '2025-03-10T08:00:00Z',
      ageYears: 8,
      proteinMgPerMl: 2,
      proteinSource: null,
      assays: [
        assay('CS', cmp('activity', 150, [90, 210, 150], false), null, null),
        assay('CI', cmp('activity', 7.485, [19, 55, 37], false), cmp('ratio_cs', 0.0499, [0.15, 0.35, 0.25], true), cmp('ratio_cii', 0.2495, [0.65, 1.85, 1.25], false)),
        assay('CII', cmp('activity', 17.994, [16, 44, 30], false), cmp('ratio_cs', 0.11996, [0.12, 0.28, 0.2], true), null),
        assay('CIII', cmp('activity', 24.24, [60, 180, 120], false), cmp('ratio_cs', 0.1616, [0.48, 1.12, 0.8], true, CIII_NOTE), cmp('ratio_cii', 0.808, [2, 6, 4], false)),
      ],
      pattern: {
        code: 'isolated:CI',
        headline: 'Isolated low complex I activity',
        findings: [],
        notes: [],
        criteriaCitation: 'Bernier FP et al., Neurology 2002 [from memory]',
      },
    },
  ],
};

const ARTIFACTS = path.resolve('test-artifacts/report-pdf');
const textOf = (html: string) => collapse(html.replace(/<[^>]+>/g, ' ').replace(/&#x27;/g, '’').replace(/&amp;/g, '&'));

describe('the results screen and the report print the same figures', () => {
  let screenRows: Map<string, string>;
  let pdf: ReadPdf;
  let pctColumn: string;
  let resultColumn: string;

  beforeAll(async () => {
    const html = renderToStaticMarkup(createElement(ResultsView, { results }));
    screenRows = new Map(
      html
        .split('data-testid="result-row-')
        .slice(1)
        .map((chunk) => [chunk.slice(0, chunk.indexOf('"')), textOf(chunk.slice(chunk.indexOf('>') + 1, chunk.indexOf('</tr>')))]),
    );
    // No database here: no stored definition or interval versions to read (so no approval line either).
    const reportable = (await toReportableResults(results, { definition: async () => null, interval: async () => null })).get(7)!;
    const doc = buildReportDocument({
      specimens: [{ ...muscleSection(), results: reportable.results, graphic: { bars: [], criterionBands: reportable.criteria } }],
    });
    const bytes = await renderReportPdf(doc);
    mkdirSync(ARTIFACTS, { recursive: true });
    writeFileSync(path.join(ARTIFACTS, 'threshold-figures.pdf'), bytes);
    pdf = await readPdf(bytes);
    // Each table row reads "<measure> <result> <unit> <interval> (<mean>) <% of mean> <Below|Within|Above> interval".
    const rows = pdf.pages.flatMap((p) => p.lines).filter((l) => / (Below|Within|Above) interval$/.test(l));
    pctColumn = rows.map((l) => / (\S+%) (Below|Within|Above) interval$/.exec(l)![1]!).join(' ');
    resultColumn = rows.map((l) => /(?:Activity|Ratio to CS|Ratio to CII) (\S+) /.exec(l)![1]!).join(' ');
  });

  it('when CI/CS is 19.96% (major) and CIII/CS 20.2% (minor), then both print distinctly and on their band’s side of 20%, alike on both', () => {
    for (const [code, pct, expected] of [
      ['CI', 19.96, '19.96%'],
      ['CIII', 20.2, '20%'],
    ] as const) {
      expect(screenRows.get(code)).toContain(`${expected} of mean`);
      expect(pctColumn).toContain(expected);
      expect(band(Number(expected.replace('%', '')))).toBe(band(pct));
    }
    // CI/CS and CI/CII are both 19.96% of their means; neither prints as "20%".
    expect(pctColumn.split(' ').filter((t) => t === '19.96%')).toHaveLength(2);
  });

  it('when a ratio lies just under its lower limit, then both print it below the limit, not as the limit', () => {
    // CII/CS 0.11996 against 0.12–0.28 is below (bounds inclusive [common practice]).
    expect(screenRows.get('CII')).toContain('0.11996');
    expect(resultColumn).toContain('0.11996');
    expect(resultColumn.split(' ')).not.toContain('0.120');
  });

  it('when a band is shown that the pattern does not reflect, then both give the reason in words', () => {
    expect(screenRows.get('CIII')).toContain('fixture reason (demo)');
    expect(pdf.flat).toContain('fixture reason (demo)');
    expect(screenRows.get('CIII')).toContain('minor-criterion band');
    expect(pdf.flat).toContain('minor-criterion band');
  });

  it('for every compared value, the screen and the report print the same % of the reference mean', () => {
    const screenPcts = [...screenRows.values()].flatMap((t) => [...t.matchAll(/([\d.]+%) of mean/g)].map((m) => m[1]!));
    const pdfPcts = pctColumn.split(' ').filter((t) => /^[\d.]+%$/.test(t));
    expect(screenPcts.length).toBe(9);
    expect([...pdfPcts].sort()).toEqual([...screenPcts].sort());
  });
});
