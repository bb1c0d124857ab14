import {
  reportCaution,
  reportSexLabels,
  type ReportDocument,
  type ReportResult,
  type ReportSpecimen,
  type ReportSpecimenSection,
} from '@/schemas/report-document';
import { specimenTypeLabels, type Measure } from '@/schemas/common';
import { intervalThresholds } from '@/schemas/result-format';
import { formatDate, formatDateOrDateTime, formatDateTime, formatNumber, formatPercent } from './format';
import { drawBarGraphic } from './bar-graphic';
import { COLORS, Composer, PAGE, STYLES, type Block } from './layout';
import type { Segment, TextStyle } from './text';
import { BAND_WORDS, formatInterval, MEASURE_PHRASES, REPORT_TITLE, STATUS_WORDS } from './words';

export { BAND_WORDS, formatInterval, MEASURE_PHRASES, REPORT_TITLE, STATUS_WORDS };

const MEASURE_LABELS: Record<Measure, string> = {
  activity: 'Activity',
  ratio_cs: 'Ratio to CS',
  ratio_cii: 'Ratio to CII',
};

const MEASURE_ORDER: Measure[] = ['activity', 'ratio_cs', 'ratio_cii'];

const seg = (text: string, style: TextStyle): Segment => ({ text, style });

export function versionLine(doc: ReportDocument): string {
  const { report } = doc;
  return report.status === 'corrected'
    ? `Version ${report.version}, corrected report (supersedes version ${report.supersedesVersion ?? '?'})`
    : `Version ${report.version}, final report`;
}

/** First-page header band: laboratory on the left, report title and identity on the right. */
export function drawFirstPageHeader(c: Composer, doc: ReportDocument): void {
  const { laboratory, report } = doc;
  const top = 24;
  const leftWidth = 262;
  const rightWidth = c.width - leftWidth - 16;
  // The name is measured apart from the address so its larger type gets its own line height.
  const name = c.measure(laboratory.name, { ...STYLES.bodyStrong, size: 12.5 }, leftWidth);
  const rest = c.measure(
    [
      seg(`${laboratory.addressLines.join('\n')}\n`, STYLES.small),
      ...(laboratory.phone ? [seg(`Telephone ${laboratory.phone}\n`, STYLES.small)] : []),
      seg(`Accreditation no. ${laboratory.accreditationNumber}`, STYLES.small),
    ],
    STYLES.small,
    leftWidth,
  );
  const title = c.measure(REPORT_TITLE, { ...STYLES.heading, size: 13.5 }, rightWidth);
  const meta = c.measure(
    [
      seg(`Report date ${formatDate(report.reportDate)}\n`, STYLES.small),
      seg(
        versionLine(doc),
        report.status === 'corrected' ? { ...STYLES.smallStrong, color: COLORS.correctedInk } : STYLES.small,
      ),
    ],
    STYLES.small,
    rightWidth,
  );
  const leftHeight = name.height + 3 + rest.height;
  const rightHeight = title.height + 3 + meta.height;
  const bandHeight = top + Math.max(leftHeight, rightHeight) + 14;
  c.rect(0, 0, PAGE.width, bandHeight, COLORS.band);
  c.rect(0, 0, PAGE.width, 5, COLORS.accent);
  c.drawBlock(name, c.left, top);
  c.drawBlock(rest, c.left, top + name.height + 3);
  const rx = c.left + leftWidth + 16;
  c.drawBlock(title, rx, top, 'right', rightWidth);
  c.drawBlock(meta, rx, top + title.height + 3, 'right', rightWidth);
  c.y = bandHeight + 14;
}

/** Slim header on every later page. */
export function drawRunningHeader(c: Composer, doc: ReportDocument): void {
  const half = c.width / 2;
  const left = c.singleLine(doc.laboratory.name, STYLES.smallStrong, half + 40);
  const right = c.singleLine(`${REPORT_TITLE} (continued)`, STYLES.small, half - 50);
  c.rect(0, 0, PAGE.width, 5, COLORS.accent);
  c.drawBlock(left, c.left, 22);
  c.drawBlock(right, c.left + half + 50, 22, 'right', half - 50);
  c.hairline(36, COLORS.rule);
  c.y = PAGE.contentTop - 8;
}

/** Label/value pairs in two columns; returns the height used. */
function labelledRows(
  c: Composer,
  rows: Array<[string, string | Segment[]]>,
  x: number,
  top: number,
  width: number,
  labelWidth: number,
  draw: boolean,
): number {
  let y = top;
  for (const [label, value] of rows) {
    const l = c.measure(label, STYLES.label, labelWidth - 6);
    const v = c.measure(value, STYLES.value, width - labelWidth);
    if (draw) {
      // Align the smaller label's baseline with the value's first baseline.
      c.drawBlock({ ...l, ascent: v.ascent }, x, y);
      c.drawBlock(v, x + labelWidth, y);
    }
    y += Math.max(l.height, v.height) + 2.5;
  }
  return y - top;
}

/** A notice box with a coloured stripe: corrected report, rejected specimen. */
function drawNotice(
  c: Composer,
  title: string,
  rows: Array<[string, string]>,
  colors: { ink: string; fill: string; stripe: string },
): void {
  const pad = 9;
  const innerX = c.left + pad + 5;
  const innerWidth = c.width - pad * 2 - 5;
  const titleBlock = c.measure(title, { weight: 600, size: 11, color: colors.ink }, innerWidth);
  const rowsHeight = labelledRows(c, rows, innerX, 0, innerWidth, 112, false);
  const height = pad + titleBlock.height + 4 + rowsHeight + pad - 2.5;
  c.ensure(height);
  const top = c.y;
  c.rect(c.left, top, c.width, height, colors.fill);
  c.rect(c.left, top, 4, height, colors.stripe);
  c.drawBlock(titleBlock, innerX, top + pad);
  labelledRows(c, rows, innerX, top + pad + titleBlock.height + 4, innerWidth, 112, true);
  c.y = top + height + 12;
}

export function drawCorrectionNotice(c: Composer, doc: ReportDocument): void {
  const { report } = doc;
  if (report.status !== 'corrected') return;
  drawNotice(
    c,
    `CORRECTED REPORT \u2014 supersedes version ${report.supersedesVersion ?? '?'}`,
    [
      ['Reason for correction', report.correctionReason ?? ''],
      ['What changed', report.changesSummary ?? ''],
      [
        'Earlier version',
        `Version ${report.supersedesVersion ?? '?'} is withdrawn and kept on file; use this version ${report.version}.`,
      ],
    ],
    { ink: COLORS.correctedInk, fill: COLORS.correctedFill, stripe: COLORS.correctedStripe },
  );
}

/** One row of a plain three-column table (item, before, after) with padding; returns nothing, moves the cursor. */
function drawTripleRow(c: Composer, cells: string[], widths: number[], style: TextStyle, fill: string | null): void {
  const blocks = cells.map((text, i) => c.measure(text, style, (widths[i] ?? 0) - 2 * CELL_PAD_X));
  const height = Math.max(...blocks.map((b) => b.height)) + 2 * CELL_PAD_Y;
  c.ensure(height);
  const top = c.y;
  if (fill) c.rect(c.left, top, c.width, height, fill);
  let x = c.left;
  blocks.forEach((block, i) => {
    c.drawBlock(block, x + CELL_PAD_X, top + CELL_PAD_Y);
    x += widths[i] ?? 0;
  });
  c.y = top + height;
  c.hairline(c.y, COLORS.rule);
}

/**
 * A corrected report signed after the case was reopened: every printed value that differs from the version it
 * supersedes, before and after, right under the correction notice.
 */
export function drawChangedValues(c: Composer, doc: ReportDocument): void {
  const { report } = doc;
  const rows = report.changedValues ?? [];
  if (report.status !== 'corrected' || rows.length === 0) return;
  const was = `Version ${report.supersedesVersion ?? '?'}`;
  c.heading(`Values changed since version ${report.supersedesVersion ?? '?'}`, 50);
  const widths = [c.width * 0.46, c.width * 0.27, c.width * 0.27];
  drawTripleRow(c, ['Value', was, `This version (${report.version})`], widths, STYLES.tableHead, COLORS.band);
  for (const r of rows) {
    drawTripleRow(c, [r.specimen ? `Specimen ${r.specimen}: ${r.item}` : r.item, r.before, r.after], widths, STYLES.cell, null);
  }
  c.space(12);
}

/** The notice of a rejected specimen (CLIA 493.1291(c)(7)); nothing for an accepted one. */
export function drawRejectionNotice(
  c: Composer,
  specimen: ReportSpecimen,
  opts: { title?: string; withSource?: boolean } = {},
): void {
  if (specimen.accepted) return;
  const rows: Array<[string, string]> = [
    ['Reason for rejection', specimen.rejectionReason ?? ''],
    ['Condition on receipt', specimen.conditionOnReceipt],
    ['Disposition', specimen.disposition ?? ''],
  ];
  if (opts.withSource) rows.unshift(['Source', specimen.description]);
  drawNotice(c, opts.title ?? 'SPECIMEN REJECTED \u2014 assays not performed', rows, {
    ink: COLORS.rejectedInk,
    fill: COLORS.rejectedFill,
    stripe: COLORS.rejectedStripe,
  });
}

/** 'Specimen A' when the specimen has a label, else 'Specimen 2' by its place in the report. */
export function specimenName(specimen: ReportSpecimen, index: number): string {
  return `Specimen ${specimen.label ?? String(index + 1)}`;
}

function acceptanceValue(specimen: ReportSpecimen): string | Segment[] {
  return specimen.accepted ? 'Accepted' : [seg('Rejected', { ...STYLES.valueStrong, color: COLORS.rejectedInk })];
}

/** The identification column of the specimens: one specimen in full, several as one line each. */
function specimenColumn(doc: ReportDocument): { title: string; rows: Array<[string, string | Segment[]]> } {
  const only = doc.specimens.length === 1 ? doc.specimens[0] : undefined;
  if (only) {
    const { specimen } = only;
    return {
      title: 'Specimen',
      rows: [
        ['Type', specimenTypeLabels[specimen.type]],
        ['Source', specimen.description],
        ['On receipt', specimen.conditionOnReceipt],
        ['Acceptance', acceptanceValue(specimen)],
      ],
    };
  }
  return {
    title: 'Specimens',
    rows: doc.specimens.map(({ specimen, results }, i): [string, string | Segment[]] => {
      const type = seg(`${specimenTypeLabels[specimen.type]}, `, STYLES.value);
      const state = !specimen.accepted
        ? seg('rejected', { ...STYLES.valueStrong, color: COLORS.rejectedInk })
        : seg(results.length > 0 ? 'accepted' : 'accepted, no results', STYLES.value);
      return [specimenName(specimen, i), [type, state]];
    }),
  };
}

/** Patient, case and specimen side by side, clinical indication below. */
export function drawIdentification(c: Composer, doc: ReportDocument): void {
  const { patient, case: kase, laboratory } = doc;
  const zone = laboratory.timeZone;
  const gap = 14;
  const colWidth = (c.width - 2 * gap) / 3;
  const labelWidth = 56;
  const columns: Array<{ title: string; rows: Array<[string, string | Segment[]]> }> = [
    {
      title: 'Patient',
      rows: [
        ['Name', [seg(patient.name, STYLES.valueStrong)]],
        ['Patient ID', [seg(patient.labPatientId, STYLES.valueStrong)]],
        ['Date of birth', formatDate(patient.dateOfBirth)],
        ...(patient.ageAtCollection ? [['Age at collection', patient.ageAtCollection] as [string, string]] : []),
        ['Sex', reportSexLabels[patient.sex]],
      ],
    },
    {
      title: 'Case',
      rows: [
        ['Accession', [seg(kase.accession, STYLES.valueStrong)]],
        ['Requested by', kase.referringClinicianName],
        ['Collected', kase.collectedAt ? formatDateOrDateTime(kase.collectedAt, zone) : 'Not recorded'],
        ['Received', formatDateTime(kase.receivedAt, zone)],
      ],
    },
    specimenColumn(doc),
  ];
  const titleHeight = 13;
  const heights = columns.map((col) => labelledRows(c, col.rows, 0, 0, colWidth, labelWidth, false));
  const indicationRows: Array<[string, string]> = [['Clinical indication', kase.clinicalIndication]];
  const indication = labelledRows(c, indicationRows, 0, 0, c.width, labelWidth + 30, false);
  const total = titleHeight + Math.max(...heights) + 6 + indication;
  c.ensure(total);
  const top = c.y;
  columns.forEach((col, i) => {
    const x = c.left + i * (colWidth + gap);
    const t = c.measure(col.title.toUpperCase(), { ...STYLES.tableHead, size: 7.5 }, colWidth);
    c.drawBlock(t, x, top);
    c.hairline(top + 10.5, COLORS.rule, x, x + colWidth);
    labelledRows(c, col.rows, x, top + titleHeight, colWidth, labelWidth, true);
  });
  const indicationTop = top + titleHeight + Math.max(...heights) + 6;
  labelledRows(c, indicationRows, c.left, indicationTop, c.width, labelWidth + 30, true);
  c.y = indicationTop + indication + 10;
}

interface Column {
  title: string;
  width: number;
  align: 'left' | 'right';
}

const COLUMNS: Column[] = [
  { title: 'Assay', width: 100, align: 'left' },
  { title: 'Measure', width: 56, align: 'left' },
  { title: 'Result', width: 46, align: 'right' },
  { title: 'Unit', width: 88, align: 'left' },
  { title: 'Reference interval (mean)', width: 93, align: 'left' },
  { title: '% of ref. mean', width: 40, align: 'right' },
  { title: 'Compared with interval', width: 88, align: 'left' },
];
const CELL_PAD_X = 4;
const CELL_PAD_Y = 3.2;

function statusSegments(r: ReportResult): Segment[] {
  const color = r.status === 'below' ? COLORS.below : r.status === 'above' ? COLORS.above : COLORS.ink;
  const strong = r.status === 'below' || r.status === 'above';
  const out = [seg(STATUS_WORDS[r.status], { ...(strong ? STYLES.cellStrong : STYLES.cell), color })];
  if (r.criterionBand) out.push(seg(`\n${BAND_WORDS[r.criterionBand]}`, { ...STYLES.small, color: COLORS.below }));
  return out;
}

function measureCells(c: Composer, r: ReportResult): Block[] {
  const contents: Array<string | Segment[]> = [
    MEASURE_LABELS[r.measure],
    r.value === null
      ? 'No value'
      : [seg(formatNumber(r.value, r.decimals, intervalThresholds({ lower: r.referenceLower, upper: r.referenceUpper })), STYLES.cellStrong)],
    r.unit,
    formatInterval(r),
    r.pctOfMean === null ? '\u2014' : formatPercent(r.pctOfMean, { below: r.pctThresholds ?? [] }),
    statusSegments(r),
  ];
  return contents.map((content, i) => c.measure(content, STYLES.cell, (COLUMNS[i + 1]?.width ?? 0) - 2 * CELL_PAD_X));
}

function drawTableHeader(c: Composer): void {
  const blocks = COLUMNS.map((col) => c.measure(col.title, STYLES.tableHead, col.width - 2 * CELL_PAD_X));
  const height = Math.max(...blocks.map((b) => b.height)) + 2 * CELL_PAD_Y;
  const top = c.y;
  c.rect(c.left, top, c.width, height, COLORS.band);
  let x = c.left;
  COLUMNS.forEach((col, i) => {
    const block = blocks[i];
    if (block) c.drawBlock(block, x + CELL_PAD_X, top + CELL_PAD_Y, col.align, col.width - 2 * CELL_PAD_X);
    x += col.width;
  });
  c.y = top + height;
  c.hairline(c.y, COLORS.accent);
}

function groupResults(results: ReportResult[]): ReportResult[][] {
  const groups = new Map<string, ReportResult[]>();
  for (const r of results) {
    const list = groups.get(r.assay) ?? [];
    list.push(r);
    groups.set(r.assay, list);
  }
  return [...groups.values()].map((list) =>
    [...list].sort((a, b) => MEASURE_ORDER.indexOf(a.measure) - MEASURE_ORDER.indexOf(b.measure)),
  );
}

/**
 * The results table of one specimen. `heading` is the section title printed above it (null: none, when the
 * specimen's own section title already stands there).
 */
export function drawResults(c: Composer, section: ReportSpecimenSection, heading: string | null = 'Results'): void {
  if (heading !== null) c.heading(heading, 60);
  if (!section.specimen.accepted) {
    c.paragraph(
      [
        seg('Not performed. ', STYLES.bodyStrong),
        seg(
          'The specimen was rejected on receipt (reason above); no assay was run and no result is reported.',
          STYLES.body,
        ),
      ],
      STYLES.body,
    );
    c.space(12);
    return;
  }
  if (section.results.length === 0) {
    c.paragraph('No results are reported for this specimen.', STYLES.body);
    c.space(12);
    return;
  }
  const bands = section.graphic.criterionBands;
  const note = c.measure(
    '% of ref. mean: the result as a percentage of the mean of its reference interval.' +
      (bands
        ? ` Criterion bands follow ${bands.ruleSetLabel}; they inform, and do not make, the interpretation.`
        : ''),
    STYLES.small,
    c.width,
  );
  drawTableHeader(c);
  const groups = groupResults(section.results);
  const assayX = c.left;
  const restX = c.left + (COLUMNS[0]?.width ?? 0);
  groups.forEach((group, gi) => {
    const first = group[0];
    if (!first) return;
    const assayBlock = c.measure(
      [seg(`${first.assay}\n`, STYLES.cellStrong), seg(first.assayName, STYLES.small)],
      STYLES.cell,
      (COLUMNS[0]?.width ?? 0) - 2 * CELL_PAD_X,
    );
    const rows = group.map((r) => {
      const cells = measureCells(c, r);
      const rowNotes = r.criterionBandNote ? [...r.flags, r.criterionBandNote] : r.flags;
      const flags =
        rowNotes.length > 0
          ? c.measure(
              [seg('Note: ', STYLES.smallStrong), seg(rowNotes.join('; '), STYLES.small)],
              STYLES.small,
              c.width - (COLUMNS[0]?.width ?? 0) - 2 * CELL_PAD_X,
            )
          : null;
      const cellHeight = Math.max(...cells.map((b) => b.height)) + 2 * CELL_PAD_Y;
      return { cells, flags, height: cellHeight + (flags ? flags.height + CELL_PAD_Y : 0), cellHeight };
    });
    const rowsHeight = rows.reduce((h, r) => h + r.height, 0);
    const groupHeight = Math.max(assayBlock.height + 2 * CELL_PAD_Y, rowsHeight);
    // The last group keeps the table note with it.
    const keep = gi === groups.length - 1 ? note.height + 5 : 0;
    if (c.y + groupHeight + keep > PAGE.contentBottom) {
      c.newPage();
      drawTableHeader(c);
    }
    const top = c.y;
    if (gi % 2 === 1) c.rect(c.left, top, c.width, groupHeight, COLORS.zebra);
    c.drawBlock(assayBlock, assayX + CELL_PAD_X, top + CELL_PAD_Y);
    let y = top;
    rows.forEach((row, ri) => {
      let x = restX;
      row.cells.forEach((block, i) => {
        const col = COLUMNS[i + 1];
        if (!col) return;
        c.drawBlock(block, x + CELL_PAD_X, y + CELL_PAD_Y, col.align, col.width - 2 * CELL_PAD_X);
        x += col.width;
      });
      if (row.flags) c.drawBlock(row.flags, restX + CELL_PAD_X, y + row.cellHeight);
      y += row.height;
      if (ri < rows.length - 1) c.hairline(y, '#e1e7e8', restX, c.left + c.width);
    });
    c.y = top + groupHeight;
    c.hairline(c.y, COLORS.rule);
  });
  c.space(5);
  c.drawBlock(note, c.left, c.y);
  c.y += note.height + 12;
}

function narrative(c: Composer, title: string, text: string): void {
  c.heading(title, 30);
  c.paragraph(text, STYLES.body);
  c.space(12);
}

/** Pattern summary (of a report with one specimen) and the interpretation. */
export function drawPatternAndInterpretation(c: Composer, doc: ReportDocument): void {
  const only = doc.specimens.length === 1 ? doc.specimens[0] : undefined;
  if (only?.patternSummary) narrative(c, 'Pattern summary', only.patternSummary);
  narrative(c, 'Interpretation', doc.interpretation);
}

/**
 * One specimen of a report with several: a titled section with its source and condition on receipt, then
 * its results table, bar graphic and pattern line; a rejected specimen gets its reason and disposition
 * instead (CLIA 493.1291(c)(5)-(7)).
 */
export function drawSpecimenSection(c: Composer, section: ReportSpecimenSection, index: number): void {
  const { specimen } = section;
  const name = specimenName(specimen, index);
  c.heading(`${name} \u2014 ${specimenTypeLabels[specimen.type]}`, specimen.accepted ? 110 : 70);
  if (!specimen.accepted) {
    drawRejectionNotice(c, specimen, { title: `${name} rejected on receipt \u2014 not performed`, withSource: true });
    c.paragraph(
      [
        seg('Not performed. ', STYLES.bodyStrong),
        seg('No assay was run on this specimen and no result is reported for it.', STYLES.body),
      ],
      STYLES.body,
    );
    c.space(14);
    return;
  }
  const rows: Array<[string, string | Segment[]]> = [
    ['Source', specimen.description],
    ['On receipt', specimen.conditionOnReceipt],
    ['Acceptance', acceptanceValue(specimen)],
  ];
  const height = labelledRows(c, rows, 0, 0, c.width, 86, false);
  c.ensure(height);
  labelledRows(c, rows, c.left, c.y, c.width, 86, true);
  c.y += height + 6;
  drawResults(c, section, null);
  if (section.results.length === 0) return;
  drawBarGraphic(c, section.graphic, `${name}: activity as % of reference mean`);
  if (section.patternSummary) {
    c.paragraph(
      [seg('Pattern summary: ', STYLES.bodyStrong), seg(section.patternSummary, STYLES.body)],
      STYLES.body,
    );
    c.space(8);
  }
  c.space(6);
}

/**
 * Replicates measured but left out of the means, ratios and pattern: each with its own value, the reason and who
 * excluded it, so the reader sees what was not counted.
 */
function drawExcludedReplicates(c: Composer, doc: ReportDocument): void {
  const excluded = doc.methods.excludedReplicates ?? [];
  if (excluded.length === 0) return;
  const several = new Set(excluded.map((e) => e.specimenLabel)).size > 1 || doc.specimens.length > 1;
  c.space(4);
  c.paragraph('Replicates excluded from the results', STYLES.smallStrong);
  for (const e of excluded) {
    const value = e.value === null ? 'no value' : `${formatNumber(e.value)} ${e.unit}`;
    c.paragraph(
      [
        seg(`Excluded replicate: ${several ? `specimen ${e.specimenLabel}, ` : ''}${e.assay}, replicate ${e.replicate}, ${value}: `, STYLES.smallStrong),
        seg(`${e.reason} (excluded by ${e.by})`, STYLES.small),
      ],
      STYLES.small,
      { x: c.left + 8, width: c.width - 8 },
    );
  }
}

/** The analytical runs the results came from, each with the release of its quality control. */
function drawRuns(c: Composer, doc: ReportDocument): void {
  const runs = doc.methods.runs ?? [];
  if (runs.length === 0) return;
  c.space(4);
  c.paragraph('Analytical runs and quality control', STYLES.smallStrong);
  for (const r of runs) {
    c.paragraph(
      [seg(`Run ${r.runNumber} (${r.results}): `, STYLES.smallStrong), seg(`${r.statement.replace(/\.$/, '')}.`, STYLES.small)],
      STYLES.small,
      { x: c.left + 8, width: c.width - 8 },
    );
  }
}

export function drawMethods(c: Composer, doc: ReportDocument): void {
  c.heading('Methods and traceability', 30);
  c.paragraph(doc.methods.summary, STYLES.body);
  if (doc.methods.definitions.length > 0) {
    c.space(4);
    c.paragraph('Assay definitions used', STYLES.smallStrong);
    for (const d of doc.methods.definitions) {
      c.paragraph(
        [seg(`${d.assay}, definition version ${d.version}: `, STYLES.smallStrong), seg(d.description, STYLES.small)],
        STYLES.small,
        { x: c.left + 8, width: c.width - 8 },
      );
    }
  }
  drawExcludedReplicates(c, doc);
  drawRuns(c, doc);
  const intervals = new Map<string, { label: string; version: number; assays: string[] }>();
  for (const r of doc.specimens.flatMap((s) => s.results)) {
    if (r.intervalLabel === null || r.intervalVersion === null) continue;
    const key = `${r.intervalLabel}\u0000${r.intervalVersion}`;
    const entry = intervals.get(key) ?? { label: r.intervalLabel, version: r.intervalVersion, assays: [] };
    const name = `${r.assay} ${MEASURE_PHRASES[r.measure]}`;
    if (!entry.assays.includes(name)) entry.assays.push(name);
    intervals.set(key, entry);
  }
  if (intervals.size > 0) {
    c.space(4);
    c.paragraph('Reference intervals used', STYLES.smallStrong);
    for (const e of intervals.values()) {
      c.paragraph(
        [
          seg(`${e.label}, interval version ${e.version}: `, STYLES.smallStrong),
          seg(e.assays.join(', '), STYLES.small),
        ],
        STYLES.small,
        { x: c.left + 8, width: c.width - 8 },
      );
    }
  }
  if (doc.methods.selfApproval) {
    c.space(4);
    c.paragraph([seg('Approval: ', STYLES.smallStrong), seg(doc.methods.selfApproval, STYLES.small)], STYLES.small);
  }
  c.space(12);
}

export function drawSignature(c: Composer, doc: ReportDocument): void {
  const { signature, laboratory } = doc;
  const pad = 9;
  const rows: Array<[string, string | Segment[]]> = [
    ['Released by', [seg(signature.signerName, STYLES.valueStrong), seg(`, ${signature.signerTitle}`, STYLES.value)]],
    ['Signed on', formatDateTime(signature.signedAt, laboratory.timeZone)],
    ['Meaning of signature', signature.meaning],
  ];
  const innerWidth = c.width - 2 * pad;
  const title = c.measure('Electronic signature', STYLES.heading, innerWidth);
  const note = c.measure(
    'Signed electronically in Cristae; the signer confirmed their identity with their password at signing.',
    STYLES.small,
    innerWidth,
  );
  const rowsHeight = labelledRows(c, rows, 0, 0, innerWidth, 110, false);
  const height = pad + title.height + 4 + rowsHeight + 2 + note.height + pad;
  c.ensure(height);
  const top = c.y;
  c.doc.save().rect(c.left, top, c.width, height).lineWidth(0.8).strokeColor(COLORS.accent).stroke().restore();
  c.drawBlock(title, c.left + pad, top + pad);
  labelledRows(c, rows, c.left + pad, top + pad + title.height + 4, innerWidth, 110, true);
  c.drawBlock(note, c.left + pad, top + pad + title.height + 4 + rowsHeight + 2);
  c.y = top + height + 12;
}

export function drawCaution(c: Composer): void {
  const pad = 8;
  const block = c.measure(
    [seg('Caution. ', STYLES.smallStrong), seg(reportCaution, { ...STYLES.small, color: COLORS.ink })],
    STYLES.small,
    c.width - 2 * pad,
  );
  const height = block.height + 2 * pad;
  c.ensure(height);
  c.rect(c.left, c.y, c.width, height, COLORS.band);
  c.drawBlock(block, c.left + pad, c.y + pad);
  c.y += height + 8;
}

/** Footer of every page, written once the page count is known. */
export function drawFooter(c: Composer, doc: ReportDocument, page: number, pageCount: number): void {
  const { patient, case: kase, report } = doc;
  const top = PAGE.contentBottom + 14;
  c.hairline(top, COLORS.rule);
  const pageText = c.measure(`Page ${page} of ${pageCount}`, STYLES.footerStrong, 80);
  const leftWidth = c.width - 90;
  const collected = kase.collectedAt ? formatDateOrDateTime(kase.collectedAt, doc.laboratory.timeZone) : 'not recorded';
  const left = c.measure(
    [
      seg('Patient ID ', STYLES.footer),
      seg(patient.labPatientId, STYLES.footerStrong),
      seg('  \u00b7  ', STYLES.footer),
      seg(patient.name, STYLES.footerStrong),
      seg('  \u00b7  Accession ', STYLES.footer),
      seg(kase.accession, STYLES.footerStrong),
      seg(`  \u00b7  Collected ${collected}\n`, STYLES.footer),
      seg(
        `${versionLine(doc)}  \u00b7  Report date ${formatDate(report.reportDate)}`,
        report.status === 'corrected' ? { ...STYLES.footerStrong, color: COLORS.correctedInk } : STYLES.footer,
      ),
    ],
    STYLES.footer,
    leftWidth,
  );
  c.drawBlock(left, c.left, top + 5);
  c.drawBlock(pageText, c.left + c.width - 80, top + 5, 'right', 80);
}
