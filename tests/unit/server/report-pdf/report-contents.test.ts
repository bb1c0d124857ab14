import { beforeAll, describe, expect, it } from 'vitest';
import type { ReportDocument, ReportResult } from '@/schemas/report-document';
import { renderReportPdf } from '../../../../server/domain/report-pdf/render-report-pdf';
import {
  buildCorrectedReportDocument,
  buildReportDocument,
  buildTwoSpecimenReportDocument,
  liverSection,
  muscleSection,
} from '../../../factories/report-document';
import { readPdf, type ReadPdf } from '../../../factories/pdf-text';

/*
 * The optional parts of the printed report, read back with pdfjs-dist (an independent PDF reader):
 * - the laboratory's telephone and the patient's age at collection (docs/api.md, GET /api/reports/:id/pdf);
 *   an unrecorded collection date said in words (CLIA 42 CFR 493.1291(c) [confirmed]: the report carries what
 *   the laboratory knows of the specimen);
 * - a corrected report's table of changed values, before and after (CLIA 493.1291(k) [confirmed]);
 * - the methods section's traceability: excluded replicates with their reason and who excluded them, the
 *   analytical runs and their quality-control release (CLIA 493.1256 and 493.1281 [confirmed as sections on
 *   control procedures and comparison of results; details from memory]), each interval used named once with
 *   the rows it served (ISO 15189:2022 7.4.1 [from memory]);
 * - the results table: rows of one assay in the order activity, ratio to CS, ratio to CII whatever order they
 *   were stored in; a criterion band's reason as a note; the column header repeated when a table runs onto a
 *   new page (a reader must know which column is which on every page [common practice]);
 * - later pages carry the laboratory and "(continued)" in a running header [common practice].
 * Everything is invented: a fictitious laboratory, patient, signer and values.
 */

const sectionRows = (pdf: ReadPdf): string[] => pdf.pages.flatMap((p) => p.lines);

function shuffled(results: ReportResult[]): ReportResult[] {
  // Ratios first, the activity last: the table must still print activity, ratio to CS, ratio to CII.
  return [...results].sort((a, b) => (a.measure === 'activity' ? 1 : 0) - (b.measure === 'activity' ? 1 : 0) || b.measure.localeCompare(a.measure));
}

describe('a corrected report with every optional part', () => {
  let doc: ReportDocument;
  let pdf: ReadPdf;

  beforeAll(async () => {
    const muscle = muscleSection();
    muscle.results = shuffled(muscle.results).map((r) =>
      r.assay === 'CI' && r.measure === 'ratio_cs' ? { ...r, criterionBand: 'minor', criterionBandNote: 'band kept although the pattern shows no deficiency (demo)' } : r,
    );
    doc = buildCorrectedReportDocument({
      laboratory: { phone: '+00 1111 222333 (demo)' },
      patient: { ageAtCollection: '8 years' },
      case: { collectedAt: null },
      specimens: [{ ...muscle, specimen: { ...muscle.specimen, label: 'A' } }, liverSection()],
      report: {
        version: 3,
        status: 'corrected',
        reportDate: '2025-03-20',
        supersedesVersion: 2,
        correctionReason: 'A replicate was excluded after review of its trace (demo).',
        changesSummary: 'CIV activity of specimen B changed; see the table of changed values.',
        changedValues: [
          { specimen: 'B', item: 'CIV activity', before: '12.1 nmol/min/mg protein', after: '17.9 nmol/min/mg protein' },
          { specimen: null, item: 'Pattern', before: 'None', after: 'Isolated complex IV pattern (demo)' },
        ],
      },
      methods: {
        summary: 'Spectrophotometric kinetic assays (demo method).',
        definitions: [{ assay: 'CI', version: 3, description: 'Rotenone-sensitive NADH oxidation (demo).' }],
        selfApproval: 'CI definition version 3 was drafted and approved by the same director (single-director laboratory, demo).',
        excludedReplicates: [
          { specimenLabel: 'B', assay: 'CIV', replicate: 2, value: 12.1, unit: 'nmol/min/mg protein', reason: 'Air bubble in the cuvette', by: 'Tech Demo One' },
          { specimenLabel: 'A', assay: 'CS', replicate: 3, value: null, unit: 'nmol/min/mg protein', reason: 'No trace recorded', by: 'Tech Demo Two' },
        ],
        runs: [
          { runNumber: 'R-0042', qcStatus: 'accept', overrideReason: null, results: 'specimen A: CI, CS', statement: 'quality control accepted.' },
          { runNumber: 'R-0043', qcStatus: 'warn', overrideReason: 'Level 2 drift reviewed', results: 'specimen B: CIV', statement: 'released with a warning by the director' },
        ],
      },
    });
    pdf = await readPdf(await renderReportPdf(doc));
  }, 120_000);

  it('prints the telephone under the address and the age at collection beside the date of birth', () => {
    expect(pdf.pages[0]!.lines).toContain('Telephone +00 1111 222333 (demo)');
    // The label wraps in its narrow column ("Age at" / "collection"); the value stands on the label's first line.
    const lines = pdf.pages[0]!.lines;
    const age = lines.findIndex((l) => l.includes('Age at 8 years'));
    expect(age).toBeGreaterThan(lines.findIndex((l) => l.includes('Date of birth 9 Aug 2016')));
  });

  it('says in words that the collection date was not recorded, in the identification and in every footer', () => {
    expect(pdf.pages[0]!.flat).toContain('Collected Not recorded');
    for (const page of pdf.pages) expect(page.flat).toContain('Collected not recorded');
  });

  it('lists the specimens one line each: type and state', () => {
    expect(pdf.pages[0]!.flat).toContain('Specimen A Skeletal muscle, accepted');
    expect(pdf.pages[0]!.flat).toContain('Specimen B Liver, accepted');
  });

  it('tabulates the changed values against the superseded version, naming the specimen where there are several', () => {
    expect(sectionRows(pdf)).toContain('Values changed since version 2');
    expect(pdf.pages[0]!.flat).toContain(
      'Values changed since version 2 Value Version 2 This version (3) ' +
        'Specimen B: CIV activity 12.1 nmol/min/mg protein 17.9 nmol/min/mg protein ' +
        'Pattern None Isolated complex IV pattern (demo)',
    );
    expect(pdf.flat).toContain('Version 2 is withdrawn and kept on file; use this version 3.');
  });

  it('prints the rows of an assay in the order activity, ratio to CS, ratio to CII, whatever order they were stored in', () => {
    const rows = sectionRows(pdf);
    const ci = ['CI Activity 9.5', 'Ratio to CS 0.066', 'Ratio to CII 0.21'].map((start) => rows.findIndex((l) => l.includes(start)));
    expect(ci.every((i) => i >= 0)).toBe(true);
    expect(ci).toEqual([...ci].sort((a, b) => a - b));
  });

  it("prints a band's reason as the row's note, and the band in words", () => {
    expect(pdf.flat).toContain('Note: band kept although the pattern shows no deficiency (demo)');
    expect(pdf.flat).toContain('Note: Duplicate cuvettes differed by 14%; mean of the two reported');
    expect(pdf.flat.split('minor-criterion band').length - 1).toBeGreaterThanOrEqual(2);
  });

  it('explains the % of the mean and the criterion bands under each table, naming the rule set', () => {
    expect(pdf.flat).toContain(
      '% of ref. mean: the result as a percentage of the mean of its reference interval. Criterion bands follow demo rule set v1 (after Bernier et al. 2002, tissue); they inform, and do not make, the interpretation.',
    );
  });

  it('lists each excluded replicate with its specimen, value or "no value", reason and who excluded it', () => {
    expect(pdf.flat).toContain('Replicates excluded from the results');
    expect(pdf.flat).toContain('Excluded replicate: specimen B, CIV, replicate 2, 12.1 nmol/min/mg protein: Air bubble in the cuvette (excluded by Tech Demo One)');
    expect(pdf.flat).toContain('Excluded replicate: specimen A, CS, replicate 3, no value: No trace recorded (excluded by Tech Demo Two)');
  });

  it('lists each analytical run with what came from it and its quality-control release, as one sentence', () => {
    expect(pdf.flat).toContain('Analytical runs and quality control');
    expect(pdf.flat).toContain('Run R-0042 (specimen A: CI, CS): quality control accepted.');
    expect(pdf.flat).not.toContain('accepted..');
    expect(pdf.flat).toContain('Run R-0043 (specimen B: CIV): released with a warning by the director.');
  });

  it('names each reference interval once with every row it served, and the self-approval', () => {
    expect(pdf.flat).toContain('Reference intervals used');
    const muscleLine = 'Muscle, 1\u201316 y (demo), interval version 3: ';
    expect(pdf.flat.split(muscleLine).length - 1).toBe(1);
    // Every muscle row named once, none twice (the liver interval follows).
    const named = pdf.flat.split(muscleLine)[1]!.split(' Liver, all ages')[0]!.split(', ');
    const measureWords = { activity: 'activity', ratio_cs: 'ratio to CS', ratio_cii: 'ratio to CII' } as const;
    expect([...named].sort()).toEqual(doc.specimens[0]!.results.map((r) => `${r.assay} ${measureWords[r.measure]}`).sort());
    expect(pdf.flat).toContain('Liver, all ages (demo), interval version 1: CI activity, CI ratio to CS, CII activity');
    expect(pdf.flat).toContain('Approval: CI definition version 3 was drafted and approved by the same director (single-director laboratory, demo).');
    expect(pdf.flat).toContain('CI, definition version 3: Rotenone-sensitive NADH oxidation (demo).');
  });

  it('heads every later page with the laboratory and "(continued)", and not the first', () => {
    expect(pdf.pages.length).toBeGreaterThan(1);
    expect(pdf.pages[0]!.lines).not.toContain('Respiratory-chain enzyme report (continued)');
    for (const page of pdf.pages.slice(1)) {
      expect(page.lines[0]).toContain(doc.laboratory.name);
      expect(page.lines[0]).toContain('Respiratory-chain enzyme report (continued)');
    }
  });
});

describe('a results table that runs onto the next page', () => {
  let pdf: ReadPdf;

  beforeAll(async () => {
    // Long notes on every row make the muscle table taller than the first page (invented text).
    const muscle = muscleSection();
    muscle.results = muscle.results.map((r) => ({
      ...r,
      flags: [`${'Replicates agreed within the laboratory limit after a repeat measurement on a fresh homogenate; '.repeat(3)}(demo)`],
    }));
    pdf = await readPdf(await renderReportPdf(buildReportDocument({ specimens: [muscle] })));
  }, 120_000);

  it('repeats the column header on each page the table reaches', () => {
    const withRows = pdf.pages.filter((p) => p.lines.some((l) => / Activity \d/.test(l) || /^Ratio to C/.test(l) || / Ratio to C/.test(l)));
    expect(withRows.length).toBeGreaterThan(1);
    for (const page of withRows) {
      expect(page.lines.some((l) => l.startsWith('Assay Measure Result Unit Reference interval'))).toBe(true);
    }
  });

  it('keeps every row whole: each printed value stays on the same line as its measure', () => {
    const all = pdf.pages.flatMap((p) => p.lines);
    expect(all.filter((l) => /^(CI\+III |CII\+III |CIII |CIV |CII |CS |CI )?Activity \d/.test(l))).toHaveLength(7);
  });
});

describe('a report whose laboratory name is longer than the running header', () => {
  it('cuts the name at a word with an ellipsis on later pages, and prints it whole on the first', async () => {
    const name = 'Example Regional Paediatric Metabolic and Mitochondrial Diagnostics Laboratory of the Demo Health District (demo)';
    const pdf = await readPdf(await renderReportPdf(buildTwoSpecimenReportDocument({ laboratory: { name } })));
    // The first page prints the name whole, wrapped in its column beside the title.
    expect(pdf.pages[0]!.flat).toContain('Example Regional Paediatric Metabolic and');
    expect(pdf.pages[0]!.flat).toContain('Demo Health District (demo)');
    const later = pdf.pages[1]!.lines[0]!;
    expect(later).toMatch(/^Example Regional Paediatric .*\u2026/);
    expect(later).not.toContain('(demo)');
    expect(later).toContain('Respiratory-chain enzyme report (continued)');
  }, 120_000);
});
