import { createHash } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { PDFDateString } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { beforeAll, describe, expect, it } from 'vitest';
import { specimenTypeLabels } from '@/schemas/common';
import {
  reportCaution,
  type ReportDocument,
  type ReportResult,
  type ReportSpecimenSection,
} from '@/schemas/report-document';
import { renderReportPdf, ReportDocumentError } from '../../../../server/domain/report-pdf/render-report-pdf';
import {
  buildCorrectedReportDocument,
  buildRejectedReportDocument,
  buildReportDocument,
  buildTwoSpecimenReportDocument,
  liverSection,
  rejectedMuscleSection,
} from '../../../factories/report-document';
import { collapse, columnText, readPdf, type ReadPdf } from '../../../factories/pdf-text';

/**
 * The report is read back with pdfjs-dist, an independent PDF reader, and checked against the
 * content rules of domain.md section 5:
 *  - US CLIA 42 CFR 493.1291(c)(1)-(7) [confirmed];
 *  - ISO 15189:2022 report items [from memory]: patient ID on every page, "page x of y", who
 *    released, amended reports marked as revisions naming what they supersede;
 *  - 21 CFR Part 11 signature manifestation [from memory]: printed name, date and time, meaning;
 *  - the product brief's caution.
 */

const ARTIFACTS = path.resolve('test-artifacts/report-pdf');

function save(name: string, bytes: Buffer): void {
  mkdirSync(ARTIFACTS, { recursive: true });
  writeFileSync(path.join(ARTIFACTS, name), bytes);
}

/** pdfjs reports the micro sign as Greek mu and the superscript minus is drawn as a raised minus. */
const asExtracted = (s: string): string => collapse(s).replace(/µ/g, 'μ').replace(/⁻/g, '\u2212');

const sha256 = (b: Buffer): string => createHash('sha256').update(b).digest('hex');

/** Expected printing of a value: fixed decimals from the assay definition, Unicode minus sign. */
const fixed = (v: number, d: number | undefined): string => v.toFixed(d ?? 2).replace('-', '\u2212');
const MEASURE_WORDS = { activity: 'Activity', ratio_cs: 'Ratio to CS', ratio_cii: 'Ratio to CII' } as const;

describe('renderReportPdf: final report of an accepted specimen', () => {
  let doc: ReportDocument;
  let section: ReportSpecimenSection;
  let bytes: Buffer;
  let pdf: ReadPdf;

  beforeAll(async () => {
    doc = buildReportDocument();
    section = doc.specimens[0]!;
    bytes = await renderReportPdf(doc);
    save('final.pdf', bytes);
    pdf = await readPdf(bytes);
  });

  it('when rendered, then it is a PDF of more than one A4 page', () => {
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    // A multi-page fixture is needed for the every-page checks below to mean anything.
    expect(pdf.pages.length).toBeGreaterThanOrEqual(2);
    expect(bytes.toString('latin1')).toMatch(/\/MediaBox \[0 0 595\.28 841\.89\]/);
  });

  it('when read back, then it shows patient name and ID, laboratory name and address, report date (CLIA 493.1291(c)(1)-(3) [confirmed])', () => {
    expect(pdf.flat).toContain(doc.patient.name);
    expect(pdf.flat).toContain(doc.patient.labPatientId);
    expect(pdf.flat).toContain(doc.laboratory.name);
    for (const line of doc.laboratory.addressLines) expect(pdf.pages[0]?.lines).toContain(line);
    expect(pdf.flat).toContain(`Accreditation no. ${doc.laboratory.accreditationNumber}`);
    // reportDate 2025-03-14, printed day-month-name-year so day and month cannot be swapped.
    expect(pdf.pages[0]?.flat).toContain('Report date 14 Mar 2025');
  });

  it('when read back, then it names the test performed and the specimen source (CLIA 493.1291(c)(4)-(5) [confirmed])', () => {
    expect(pdf.pages[0]?.flat).toContain('Respiratory-chain enzyme report');
    const assayColumn = columnText(pdf.pages[0]!, 'Assay', 'Measure');
    for (const r of section.results) expect(assayColumn).toContain(`${r.assay} ${r.assayName}`);
    const specimenColumn = columnText(pdf.pages[0]!, 'SPECIMEN');
    expect(specimenColumn).toContain(`Type ${specimenTypeLabels[section.specimen.type]}`);
    expect(specimenColumn).toContain(`Source ${section.specimen.description}`);
    expect(specimenColumn).toContain(`On receipt ${section.specimen.conditionOnReceipt}`);
  });

  it('when read back, then every result stands on one line with its measure, value, unit and reference interval (CLIA 493.1291(c)(6), (d) [confirmed])', () => {
    const allLines = pdf.pages.flatMap((p) => p.lines);
    const missing: string[] = [];
    const check = (r: ReportResult): void => {
      const value = r.value === null ? 'No value' : fixed(r.value, r.decimals);
      const interval = `${fixed(r.referenceLower!, r.decimals)}\u2013${fixed(r.referenceUpper!, r.decimals)}`;
      const found = allLines.some(
        (l) =>
          l.includes(`${MEASURE_WORDS[r.measure]} ${value} ${r.unit} ${interval}`) &&
          l.includes(`${Math.round(r.pctOfMean!)}%`),
      );
      if (!found) missing.push(`${r.assay} ${r.measure}`);
    };
    section.results.forEach(check);
    expect(missing).toEqual([]);
  });

  it('when a result lies outside its interval, then the table says so in words, not only colour', () => {
    const below = section.results.filter((r) => r.status === 'below').length;
    const within = section.results.filter((r) => r.status === 'within').length;
    const count = (word: string): number => pdf.pages.flatMap((p) => p.lines).filter((l) => l.includes(word)).length;
    expect(below).toBeGreaterThan(0);
    expect(count('Below interval')).toBe(below);
    expect(count('Within interval')).toBe(within);
    const minorBands = section.results.filter((r) => r.criterionBand === 'minor').length;
    expect(pdf.flat.split('minor-criterion band').length - 1).toBeGreaterThanOrEqual(minorBands);
  });

  it('when a result carries a flag, then the flag is printed', () => {
    const flagged = section.results.filter((r) => r.flags.length > 0);
    expect(flagged.length).toBeGreaterThan(0);
    for (const r of flagged) for (const f of r.flags) expect(pdf.flat).toContain(f);
  });

  it('when read back, then every page carries the patient ID, accession, version and "Page x of y" (ISO 15189:2022 [from memory])', () => {
    const total = pdf.pages.length;
    pdf.pages.forEach((page, i) => {
      expect(page.flat).toContain(`Patient ID ${doc.patient.labPatientId}`);
      expect(page.flat).toContain(`Accession ${doc.case.accession}`);
      expect(page.flat).toContain('Version 1, final report');
      expect(page.flat).toContain(`Page ${i + 1} of ${total}`);
      // collection date on every page (ISO 15189 [from memory]); collectedAt 2025-03-03.
      expect(page.flat).toContain('Collected 3 Mar 2025');
    });
  });

  it('when read back, then the signature shows who released it, printed name, date and time, and meaning (21 CFR Part 11 and ISO 15189 [from memory])', () => {
    const s = doc.signature;
    expect(pdf.flat).toContain(`Released by ${s.signerName}, ${s.signerTitle}`);
    // signedAt 2025-03-14T09:30:00Z in Europe/Amsterdam: CET, UTC+1, in March before the switch to
    // summer time on the last Sunday (30 Mar 2025) [common practice: EU summer-time rule].
    expect(pdf.flat).toContain('Signed on 14 Mar 2025 10:30 (UTC+01:00)');
    expect(pdf.flat).toContain(`Meaning of signature ${s.meaning}`);
  });

  it('when read back, then the caution of the product brief is printed in full', () => {
    expect(pdf.flat).toContain(collapse(reportCaution));
    // The three points the product brief requires, checked as ideas rather than the exact wording.
    expect(reportCaution).toMatch(/support.*do not replace.*diagnosis.*licensed clinician/);
    expect(reportCaution).toMatch(/specimen.*clinical picture/s);
    expect(reportCaution).toMatch(/regulations.*accreditation/s);
  });

  it('when read back, then pattern, interpretation, methods and interval versions are printed', () => {
    expect(pdf.flat).toContain(collapse(section.patternSummary!));
    for (const para of doc.interpretation.split('\n\n')) expect(pdf.flat).toContain(collapse(para));
    expect(pdf.flat).toContain(asExtracted(doc.methods.summary));
    for (const d of doc.methods.definitions) expect(pdf.flat).toContain(`${d.assay}, definition version ${d.version}:`);
    for (const r of section.results) expect(pdf.flat).toContain(`${r.intervalLabel}, interval version ${r.intervalVersion}`);
  });

  it('when read back, then the bar graphic labels each complex ratio with its % of mean', () => {
    const page = pdf.pages.find((p) => p.flat.includes('Activity as % of reference mean'));
    expect(page).toBeDefined();
    for (const bar of section.graphic.bars) {
      for (const v of [bar.pctOfMeanRatioCs, bar.pctOfMeanRatioCii]) {
        if (v !== null) expect(page?.flat).toContain(`${Math.round(v)}%`);
      }
    }
    expect(page?.flat).toContain('Ratio to citrate synthase (CS)');
    expect(page?.flat).toContain('Ratio to complex II (CII)');
    expect(page?.flat).toContain(section.graphic.criterionBands!.ruleSetLabel);
  });

  it('when read back, then special characters survive: ε, µ, ±, °, –, superscript one', () => {
    for (const ch of ['ε', 'µ', '±', '°', '–', '¹']) expect(pdf.flat).toContain(asExtracted(ch));
    expect(pdf.flat.includes('\u0000')).toBe(false);
    expect(pdf.flat).not.toContain('\ufffd');
  });

  it('when written, then it embeds IBM Plex Sans and no built-in Helvetica', () => {
    const raw = bytes.toString('latin1');
    expect(raw).toMatch(/\/FontName \/[A-Z]{6}\+IBMPlexSans-Regular/);
    expect(raw).toMatch(/\/FontName \/[A-Z]{6}\+IBMPlexSans-SemiBold/);
    expect(raw).not.toContain('Helvetica');
  });

  it('when written, then no body text runs into the footer band', () => {
    // The footer lines start with these; anything else below the footer rule is an overflow.
    const footerStarts = ['Patient ID', 'Version '];
    for (const page of pdf.pages) {
      page.lines.forEach((line, i) => {
        const y = page.baselines[i] ?? 0;
        expect(y).toBeGreaterThan(0);
        if (y < 48) expect(footerStarts.some((s) => line.startsWith(s)), line).toBe(true);
      });
    }
  });
});

describe('renderReportPdf: corrected report', () => {
  it('when a report corrects version 1, then every page says so and the first shows the reason and the change (CLIA 493.1291(k) [confirmed]; ISO 15189 [from memory])', async () => {
    const doc = buildCorrectedReportDocument();
    const bytes = await renderReportPdf(doc);
    save('corrected.pdf', bytes);
    const pdf = await readPdf(bytes);

    expect(pdf.pages[0]?.flat).toContain('CORRECTED REPORT \u2014 supersedes version 1');
    expect(pdf.pages[0]?.flat).toContain(doc.report.correctionReason!);
    expect(pdf.pages[0]?.flat).toContain(collapse(doc.report.changesSummary!));
    expect(pdf.pages[0]?.flat).toContain('Report date 18 Mar 2025');
    for (const page of pdf.pages) expect(page.flat).toContain('Version 2, corrected report (supersedes version 1)');
    expect(pdf.flat).not.toContain('final report');
    expect(pdf.flat).toContain('Signed on 18 Mar 2025 15:05 (UTC+01:00)');
  });

  it('when a final report is rendered, then it carries no correction notice', async () => {
    const pdf = await readPdf(await renderReportPdf(buildReportDocument()));
    expect(pdf.flat).not.toMatch(/CORRECTED|supersedes/i);
  });
});

describe('renderReportPdf: rejected specimen', () => {
  it('when the specimen was rejected, then the reason, condition and disposition are printed and no results table (CLIA 493.1291(c)(7) [confirmed])', async () => {
    const doc = buildRejectedReportDocument();
    const section = doc.specimens[0]!;
    const bytes = await renderReportPdf(doc);
    save('rejected.pdf', bytes);
    const pdf = await readPdf(bytes);

    expect(pdf.pages[0]?.flat).toContain('SPECIMEN REJECTED');
    expect(pdf.pages[0]?.flat).toContain(`Reason for rejection ${section.specimen.rejectionReason}`);
    expect(pdf.pages[0]?.flat).toContain(`Condition on receipt ${section.specimen.conditionOnReceipt}`);
    expect(pdf.pages[0]?.flat).toContain(`Disposition ${section.specimen.disposition}`);
    expect(pdf.flat).toContain('Not performed.');
    expect(pdf.flat).not.toContain('Reference interval');
    expect(pdf.flat).not.toContain('Activity as % of reference mean');
    // Still a complete report: patient, laboratory, signature, caution, page numbering.
    expect(pdf.flat).toContain(doc.patient.labPatientId);
    expect(pdf.flat).toContain(doc.laboratory.addressLines[0]);
    expect(pdf.flat).toContain(`Released by ${doc.signature.signerName}`);
    expect(pdf.flat).toContain(collapse(reportCaution));
    expect(pdf.pages.at(-1)?.flat).toContain(`Page ${pdf.pages.length} of ${pdf.pages.length}`);
  });
});

/** The lines from the first one containing `from` up to (not including) the first after it containing `to`. */
function linesBetween(pdf: ReadPdf, from: string, to: string | null): string[] {
  const all = pdf.pages.flatMap((p) => p.lines);
  const start = all.findIndex((l) => l.includes(from));
  if (start < 0) throw new Error(`No line with '${from}'`);
  const rel = to === null ? -1 : all.slice(start + 1).findIndex((l) => l.includes(to));
  return all.slice(start, rel < 0 ? undefined : start + 1 + rel);
}

/** True when one of `lines` prints result `r` with its measure, value, unit and interval in one row. */
function printsResult(lines: string[], r: ReportResult): boolean {
  const value = r.value === null ? 'No value' : fixed(r.value, r.decimals);
  const interval = `${fixed(r.referenceLower!, r.decimals)}\u2013${fixed(r.referenceUpper!, r.decimals)}`;
  return lines.some((l) => l.includes(`${MEASURE_WORDS[r.measure]} ${value} ${r.unit} ${interval}`));
}

/*
 * A case with several specimens: every result is printed under its own specimen, with that specimen's type
 * and source, and a rejected specimen's condition and disposition are stated (US CLIA 42 CFR
 * 493.1291(c)(5), (6), (7) [confirmed], domain.md section 5).
 */
describe('renderReportPdf: several specimens', () => {
  it('when muscle and liver both have results, then each specimen section shows its type, source, condition, results and graphic (CLIA 493.1291(c)(5),(6) [confirmed])', async () => {
    const doc = buildTwoSpecimenReportDocument();
    const [muscle, liver] = doc.specimens;
    const bytes = await renderReportPdf(doc);
    save('two-specimens.pdf', bytes);
    const pdf = await readPdf(bytes);

    // The identification block lists both specimens.
    expect(pdf.pages[0]?.flat).toContain('Specimen A Skeletal muscle, accepted');
    expect(pdf.pages[0]?.flat).toContain('Specimen B Liver, accepted');

    const muscleLines = linesBetween(pdf, 'Specimen A \u2014 Skeletal muscle', 'Specimen B \u2014 Liver');
    const liverLines = linesBetween(pdf, 'Specimen B \u2014 Liver', 'Interpretation');
    const muscleText = collapse(muscleLines.join(' '));
    const liverText = collapse(liverLines.join(' '));
    expect(muscleText).toContain(`Source ${muscle!.specimen.description}`);
    expect(muscleText).toContain(`On receipt ${muscle!.specimen.conditionOnReceipt}`);
    expect(liverText).toContain(`Source ${liver!.specimen.description}`);
    expect(liverText).toContain(`On receipt ${liver!.specimen.conditionOnReceipt}`);

    // Each result stands in its own specimen's section, not in the other's: the CI activity differs
    // between the two (9.5 in muscle, 21.4 in liver, invented demo values).
    const missing = [
      ...muscle!.results.filter((r) => !printsResult(muscleLines, r)).map((r) => `muscle ${r.assay} ${r.measure}`),
      ...liver!.results.filter((r) => !printsResult(liverLines, r)).map((r) => `liver ${r.assay} ${r.measure}`),
    ];
    expect(missing).toEqual([]);
    const liverCiActivity = liver!.results.find((r) => r.assay === 'CI' && r.measure === 'activity')!;
    const muscleCiActivity = muscle!.results.find((r) => r.assay === 'CI' && r.measure === 'activity')!;
    expect(printsResult(muscleLines, liverCiActivity)).toBe(false);
    expect(printsResult(liverLines, muscleCiActivity)).toBe(false);
    // Assays measured only in muscle do not appear in the liver table.
    expect(liverText).not.toContain('CIII Ubiquinol:cytochrome c reductase');

    // Each specimen has its own bar graphic and pattern line.
    expect(muscleText).toContain('Specimen A: activity as % of reference mean');
    expect(liverText).toContain('Specimen B: activity as % of reference mean');
    expect(muscleText).toContain(`Pattern summary: ${collapse(muscle!.patternSummary!)}`);
    expect(liverText).toContain(`Pattern summary: ${collapse(liver!.patternSummary!)}`);

    // Both interval sets are traceable, and the report stays complete and numbered.
    for (const r of [...muscle!.results, ...liver!.results]) {
      expect(pdf.flat).toContain(`${r.intervalLabel}, interval version ${r.intervalVersion}`);
    }
    expect(pdf.flat).toContain(`Released by ${doc.signature.signerName}`);
    pdf.pages.forEach((page, i) => expect(page.flat).toContain(`Page ${i + 1} of ${pdf.pages.length}`));
    // Nothing runs into the footer band.
    for (const page of pdf.pages) {
      page.lines.forEach((line, i) => {
        if ((page.baselines[i] ?? 0) < 48) expect(['Patient ID', 'Version '].some((st) => line.startsWith(st)), line).toBe(true);
      });
    }
  });

  it('when specimen A was rejected and B accepted, then A states its rejection reason and disposition and B its results (CLIA 493.1291(c)(5),(6),(7) [confirmed])', async () => {
    const rejected = rejectedMuscleSection();
    const doc = buildReportDocument({
      specimens: [{ ...rejected, specimen: { ...rejected.specimen, label: 'A' } }, liverSection()],
      interpretation: 'Specimen A could not be analysed; liver (specimen B) shows a low complex IV activity (demo).',
    });
    const [a, b] = doc.specimens;
    const bytes = await renderReportPdf(doc);
    save('rejected-and-accepted.pdf', bytes);
    const pdf = await readPdf(bytes);

    expect(pdf.pages[0]?.flat).toContain('Specimen A Skeletal muscle, rejected');
    const aText = collapse(linesBetween(pdf, 'Specimen A \u2014 Skeletal muscle', 'Specimen B \u2014 Liver').join(' '));
    expect(aText).toContain('Specimen A rejected on receipt \u2014 not performed');
    expect(aText).toContain(`Source ${a!.specimen.description}`);
    expect(aText).toContain(`Reason for rejection ${a!.specimen.rejectionReason}`);
    expect(aText).toContain(`Condition on receipt ${a!.specimen.conditionOnReceipt}`);
    expect(aText).toContain(`Disposition ${a!.specimen.disposition}`);
    expect(aText).toContain('Not performed.');
    expect(aText).not.toContain('Reference interval');

    const bLines = linesBetween(pdf, 'Specimen B \u2014 Liver', 'Interpretation');
    expect(b!.results.filter((r) => !printsResult(bLines, r)).map((r) => `${r.assay} ${r.measure}`)).toEqual([]);
    expect(collapse(bLines.join(' '))).toContain('Specimen B: activity as % of reference mean');
  });

  it('when a specimen was accepted but has no results, then its section says so', async () => {
    const liver = liverSection();
    const empty = { ...liver, results: [], graphic: { bars: [], criterionBands: null }, patternSummary: null };
    const doc = buildTwoSpecimenReportDocument();
    const pdf = await readPdf(await renderReportPdf({ ...doc, specimens: [doc.specimens[0]!, empty] }));
    expect(pdf.pages[0]?.flat).toContain('Specimen B Liver, accepted, no results');
    const bText = collapse(linesBetween(pdf, 'Specimen B \u2014 Liver', 'Interpretation').join(' '));
    expect(bText).toContain('Acceptance Accepted');
    expect(bText).toContain('No results are reported for this specimen.');
    expect(bText).not.toMatch(/activity as % of reference mean/i);
  });
});

describe('renderReportPdf: a result with no reference interval', () => {
  it('when a specimen type has no interval, then the value is still printed with its unit, as not compared (CLIA 493.1291(c)(6) [confirmed])', async () => {
    const liver = liverSection();
    const results = liver.results.map((r) => ({
      ...r,
      referenceLower: null,
      referenceUpper: null,
      referenceMean: null,
      intervalLabel: null,
      intervalVersion: null,
      status: 'not_compared' as const,
      pctOfMean: null,
      criterionBand: null,
    }));
    const doc = buildTwoSpecimenReportDocument();
    const bytes = await renderReportPdf({
      ...doc,
      specimens: [doc.specimens[0]!, { ...liver, results, graphic: { bars: [], criterionBands: null }, patternSummary: null }],
    });
    const pdf = await readPdf(bytes);
    const lines = linesBetween(pdf, 'Specimen B \u2014 Liver', 'Interpretation');
    const missing = results.filter(
      (r) => !lines.some((l) => l.includes(`${MEASURE_WORDS[r.measure]} ${fixed(r.value!, r.decimals)} ${r.unit} No interval`) && l.includes('Not compared')),
    );
    expect(missing.map((r) => `${r.assay} ${r.measure}`)).toEqual([]);
    expect(pdf.flat).not.toContain('Liver, all ages (demo), interval version');
  });
});

describe('renderReportPdf: long content', () => {
  it('when the interpretation runs over several pages, then every page still has its header, footer and numbering', async () => {
    const paragraph =
      'The director discusses the specimen, the ratios and their reference intervals at length in this invented paragraph. ';
    const doc = buildReportDocument({ interpretation: Array.from({ length: 12 }, () => paragraph.repeat(6)).join('\n\n') });
    const bytes = await renderReportPdf(doc);
    save('long.pdf', bytes);
    const pdf = await readPdf(bytes);
    expect(pdf.pages.length).toBeGreaterThanOrEqual(4);
    pdf.pages.forEach((page, i) => {
      expect(page.flat).toContain(`Page ${i + 1} of ${pdf.pages.length}`);
      expect(page.flat).toContain(`Patient ID ${doc.patient.labPatientId}`);
      if (i > 0) expect(page.lines[0]).toContain(doc.laboratory.name);
    });
    const words = (s: string): number => s.split(/\s+/).filter((w) => w === 'invented').length;
    // Nothing lost at page breaks: every copy of the paragraph is there.
    expect(words(pdf.flat)).toBe(12 * 6);
  });
});

describe('renderReportPdf: names outside basic Latin', () => {
  it('when names carry Polish, Icelandic and Vietnamese letters, then they print from the fallback fonts and read back intact', async () => {
    const doc = buildReportDocument({
      patient: { name: 'Zoë Łukasik-Nguyễn Þórsdóttir (demo)' },
      case: { referringClinicianName: 'Dr Émile Ødegård-Šimková (demo)' },
    });
    const pdf = await readPdf(await renderReportPdf(doc));
    const nfc = (s: string): string => s.normalize('NFC');
    expect(nfc(pdf.flat)).toContain(nfc(`Patient ID ${doc.patient.labPatientId} · ${doc.patient.name}`));
    expect(nfc(columnText(pdf.pages[0]!, 'CASE', 'SPECIMEN'))).toContain(nfc(doc.case.referringClinicianName));
    expect(pdf.flat).not.toContain('?');
  });
});

describe('renderReportPdf: determinism', () => {
  it('when the same document is rendered twice, then the bytes and their SHA-256 are identical', async () => {
    const doc = buildCorrectedReportDocument();
    const first = await renderReportPdf(doc);
    const second = await renderReportPdf(structuredClone(doc));
    expect(sha256(second)).toBe(sha256(first));
  });

  it('when read back, then the PDF creation and modification dates are the signing time, not the clock', async () => {
    const doc = buildReportDocument();
    const pdf = await readPdf(await renderReportPdf(doc));
    const created = PDFDateString.toDateObject(pdf.info.CreationDate as string);
    const modified = PDFDateString.toDateObject(pdf.info.ModDate as string);
    expect(created?.toISOString()).toBe(new Date(doc.signature.signedAt).toISOString());
    expect(modified?.toISOString()).toBe(new Date(doc.signature.signedAt).toISOString());
  });

  it('when only the signing time differs, then the bytes differ (the file ID follows the document)', async () => {
    const a = await renderReportPdf(buildReportDocument());
    const b = await renderReportPdf(buildReportDocument({ signature: { signedAt: '2025-03-14T09:31:00Z' } }));
    expect(sha256(a)).not.toBe(sha256(b));
    const idOf = (buf: Buffer): string | undefined => /\/ID \[<([0-9a-f]+)>/i.exec(buf.toString('latin1'))?.[1];
    expect(idOf(a)).toBeDefined();
    expect(idOf(a)).not.toBe(idOf(b));
  });

  it('when no patient name is given to the metadata, then the Info title names only the accession and version', async () => {
    const doc = buildReportDocument();
    const pdf = await readPdf(await renderReportPdf(doc));
    expect(pdf.info.Title).toContain(doc.case.accession);
    expect(pdf.info.Title).not.toContain(doc.patient.name);
  });
});

describe('renderReportPdf: invalid input', () => {
  it('when a corrected report does not say which version it supersedes, then the error names report.supersedesVersion', async () => {
    const doc = buildCorrectedReportDocument();
    const bad = { ...doc, report: { ...doc.report, supersedesVersion: null } };
    await expect(renderReportPdf(bad)).rejects.toThrow(ReportDocumentError);
    await expect(renderReportPdf(bad)).rejects.toThrow(/report\.supersedesVersion/);
  });

  it('when a rejected specimen has no disposition, then the error names specimens.0.specimen.disposition', async () => {
    const doc = buildRejectedReportDocument();
    const section = doc.specimens[0]!;
    const bad = { ...doc, specimens: [{ ...section, specimen: { ...section.specimen, disposition: null } }] };
    await expect(renderReportPdf(bad)).rejects.toThrow(/specimens\.0\.specimen\.disposition/);
  });

  it('when a result row has no unit, then the error names the specimen, the row and the field', async () => {
    const doc = buildTwoSpecimenReportDocument();
    const liver = doc.specimens[1]!;
    const results = liver.results.map((r, i) => (i === 2 ? { ...r, unit: '' } : r));
    const bad = { ...doc, specimens: [doc.specimens[0]!, { ...liver, results }] };
    await expect(renderReportPdf(bad)).rejects.toThrow(/specimens\.1\.results\.2\.unit/);
  });

  it('when the same assay and measure appear twice in one specimen, then the error names the second row', async () => {
    const doc = buildReportDocument();
    const section = doc.specimens[0]!;
    const results = [...section.results, { ...section.results[0]!, value: 1 }];
    await expect(renderReportPdf({ ...doc, specimens: [{ ...section, results }] })).rejects.toThrow(
      new RegExp(`specimens\\.0\\.results\\.${results.length - 1}: Duplicate result for CI activity`),
    );
  });

  it('when two specimens carry the same assay and measure, then the document is valid (each result belongs to its specimen)', async () => {
    const doc = buildTwoSpecimenReportDocument();
    expect(doc.specimens[0]!.results.some((r) => r.assay === 'CI' && r.measure === 'activity')).toBe(true);
    expect(doc.specimens[1]!.results.some((r) => r.assay === 'CI' && r.measure === 'activity')).toBe(true);
    await expect(renderReportPdf(doc)).resolves.toBeInstanceOf(Buffer);
  });

  it('when a result has no interval but carries reference limits, then the error names its intervalLabel', async () => {
    const doc = buildReportDocument();
    const section = doc.specimens[0]!;
    const results = section.results.map((r, i) =>
      i === 1 ? { ...r, intervalLabel: null, intervalVersion: null, status: 'not_compared' as const } : r,
    );
    await expect(renderReportPdf({ ...doc, specimens: [{ ...section, results }] })).rejects.toThrow(
      /specimens\.0\.results\.1\.intervalLabel: Reference limits need the interval/,
    );
  });

  it('when the report has no specimen, then the error names specimens', async () => {
    const doc = buildReportDocument();
    await expect(renderReportPdf({ ...doc, specimens: [] })).rejects.toThrow(/specimens: At least one specimen/);
  });

  it('when a rejected specimen carries results, then the error names its results', async () => {
    const doc = buildTwoSpecimenReportDocument();
    const [a, b] = doc.specimens;
    const rejected = { ...a!, specimen: { ...rejectedMuscleSection().specimen, label: 'A' } };
    await expect(renderReportPdf({ ...doc, specimens: [rejected, b!] })).rejects.toThrow(
      /specimens\.0\.results: A rejected specimen has no results/,
    );
  });

  it('when the signing time has no zone, then the error names signature.signedAt', async () => {
    const doc = buildReportDocument();
    const bad = { ...doc, signature: { ...doc.signature, signedAt: '2025-03-14 09:30' } };
    await expect(renderReportPdf(bad)).rejects.toThrow(/signature\.signedAt/);
  });
});
