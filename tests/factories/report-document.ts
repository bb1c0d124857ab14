import {
  reportDocumentSchema,
  type ReportDocument,
  type ReportGraphic,
  type ReportResult,
  type ReportSpecimenSection,
} from '@/schemas/report-document';
import type { AssayCode, Measure } from '@/schemas/common';

/**
 * Report documents for tests. Everything here is invented: the laboratory, the people, the
 * accreditation number, the reference intervals and the results (demo values, not clinical data).
 */

type SectionOverride<T> = T extends readonly unknown[] ? T : T extends object ? Partial<T> : T;
export type ReportDocumentOverrides = { [K in keyof ReportDocument]?: SectionOverride<ReportDocument[K]> };

const ACTIVITY_UNIT = 'nmol/min/mg protein';

const ASSAY_NAMES: Record<AssayCode, string> = {
  CI: 'NADH:ubiquinone oxidoreductase',
  CII: 'Succinate:ubiquinone oxidoreductase',
  CIII: 'Ubiquinol:cytochrome c reductase',
  CIV: 'Cytochrome c oxidase',
  'CI+III': 'NADH:cytochrome c reductase',
  'CII+III': 'Succinate:cytochrome c reductase',
  CS: 'Citrate synthase',
};

/** Invented demo criterion bands (the shape of the 2002 enzyme criteria for a tissue). */
const BANDS = { majorBelowPct: 20, minorBelowPct: 30 };

function result(
  assay: AssayCode,
  measure: Measure,
  value: number,
  [lower, upper, mean]: [number, number, number],
  decimals: number,
  flags: string[] = [],
  intervalLabel = 'Muscle, 1\u201316 y (demo)',
): ReportResult {
  const pct = (value / mean) * 100;
  return {
    assay,
    assayName: ASSAY_NAMES[assay],
    measure,
    value,
    unit: measure === 'activity' ? ACTIVITY_UNIT : 'ratio',
    referenceLower: lower,
    referenceUpper: upper,
    referenceMean: mean,
    intervalLabel,
    intervalVersion: intervalLabel.startsWith('Liver') ? 1 : 3,
    status: value < lower ? 'below' : value > upper ? 'above' : 'within',
    pctOfMean: pct,
    criterionBand: pct < BANDS.majorBelowPct ? 'major' : pct < BANDS.minorBelowPct ? 'minor' : null,
    flags,
    decimals,
  };
}

/** A demo isolated complex I pattern in skeletal muscle. */
function demoResults(): ReportResult[] {
  return [
    result('CI', 'activity', 9.5, [14, 48, 28], 1),
    result('CI', 'ratio_cs', 0.066, [0.12, 0.3, 0.2], 3),
    result('CI', 'ratio_cii', 0.21, [0.45, 1.2, 0.8], 2),
    result('CII', 'activity', 42.3, [25, 70, 45], 1),
    result('CII', 'ratio_cs', 0.29, [0.18, 0.45, 0.3], 2),
    result('CIII', 'activity', 110.4, [60, 180, 115], 1),
    result('CIII', 'ratio_cs', 0.76, [0.45, 1.2, 0.8], 2),
    result('CIII', 'ratio_cii', 2.61, [1.5, 4.2, 2.7], 2),
    result('CIV', 'activity', 85.2, [50, 160, 95], 1, ['Duplicate cuvettes differed by 14%; mean of the two reported']),
    result('CIV', 'ratio_cs', 0.59, [0.4, 1.05, 0.68], 2),
    result('CIV', 'ratio_cii', 2.01, [1.2, 3.4, 2.1], 2),
    result('CI+III', 'activity', 18.1, [25, 75, 45], 1),
    result('CI+III', 'ratio_cs', 0.124, [0.2, 0.5, 0.32], 3),
    result('CI+III', 'ratio_cii', 0.43, [0.6, 1.6, 1.0], 2),
    result('CII+III', 'activity', 38.0, [22, 70, 42], 1),
    result('CII+III', 'ratio_cs', 0.26, [0.15, 0.45, 0.3], 2),
    result('CII+III', 'ratio_cii', 0.9, [0.55, 1.45, 0.95], 2),
    result('CS', 'activity', 145.7, [80, 220, 140], 1),
  ];
}

/** A demo isolated complex IV pattern in liver (invented values and intervals). */
function demoLiverResults(): ReportResult[] {
  const liver = 'Liver, all ages (demo)';
  return [
    result('CI', 'activity', 21.4, [12, 40, 24], 1, [], liver),
    result('CI', 'ratio_cs', 0.158, [0.09, 0.3, 0.18], 3, [], liver),
    result('CII', 'activity', 63.5, [35, 95, 60], 1, [], liver),
    result('CII', 'ratio_cs', 0.47, [0.28, 0.7, 0.45], 2, [], liver),
    result('CIV', 'activity', 17.9, [55, 150, 96], 1, [], liver),
    result('CIV', 'ratio_cs', 0.132, [0.42, 1.1, 0.72], 3, [], liver),
    result('CIV', 'ratio_cii', 0.28, [0.9, 2.4, 1.55], 2, [], liver),
    result('CS', 'activity', 135.6, [70, 210, 133], 1, [], liver),
  ];
}

function graphicFrom(results: ReportResult[]): ReportGraphic {
  const pct = (assay: AssayCode, measure: Measure): number | null =>
    results.find((r) => r.assay === assay && r.measure === measure)?.pctOfMean ?? null;
  const complexes: AssayCode[] = ['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III'];
  return {
    bars: complexes.filter((a) => results.some((r) => r.assay === a)).map((assay) => ({
      assay,
      pctOfMeanRatioCs: pct(assay, 'ratio_cs'),
      pctOfMeanRatioCii: pct(assay, 'ratio_cii'),
    })),
    criterionBands: { ...BANDS, ruleSetLabel: 'demo rule set v1 (after Bernier et al. 2002, tissue)' },
  };
}

/** Specimen A of the demo case: skeletal muscle with the isolated complex I pattern. */
export function muscleSection(): ReportSpecimenSection {
  const results = demoResults();
  return {
    specimen: {
      type: 'skeletal_muscle',
      description: 'Left vastus lateralis, open biopsy, 48 mg wet weight',
      conditionOnReceipt: 'Frozen on dry ice, intact, labelled with two identifiers',
      accepted: true,
      rejectionReason: null,
      disposition: null,
    },
    results,
    graphic: graphicFrom(results),
    patternSummary:
      'Complex I and linked complex I+III activities are low relative to citrate synthase and to complex II, ' +
      'with complex II, III and IV ratios within their intervals and citrate synthase within its interval: ' +
      'the pattern of an isolated complex I deficiency.',
  };
}

/** A liver specimen with a demo isolated complex IV pattern. */
export function liverSection(): ReportSpecimenSection {
  const results = demoLiverResults();
  return {
    specimen: {
      label: 'B',
      type: 'liver',
      description: 'Specimen B, right lobe, needle biopsy, 9.5 mg wet weight',
      conditionOnReceipt: 'Frozen in liquid nitrogen, shipped on dry ice, intact',
      accepted: true,
      rejectionReason: null,
      disposition: null,
    },
    results,
    graphic: graphicFrom(results),
    patternSummary: 'Complex IV activity is low relative to citrate synthase and to complex II in liver (demo pattern).',
  };
}

/** A muscle specimen rejected on receipt: no results, rejection reason and disposition. */
export function rejectedMuscleSection(): ReportSpecimenSection {
  return {
    specimen: {
      type: 'skeletal_muscle',
      description: 'Right vastus lateralis, needle biopsy, 12 mg wet weight',
      conditionOnReceipt: 'Arrived thawed (no dry ice left in the shipper), 12 mg',
      accepted: false,
      rejectionReason: 'Thawed in transit; enzyme activities in a thawed specimen are unreliable.',
      disposition: 'Discarded after 7 days; the referring clinician was asked for a new frozen biopsy.',
    },
    results: [],
    graphic: { bars: [], criterionBands: null },
    patternSummary: null,
  };
}

function baseDocument(): ReportDocument {
  return {
    laboratory: {
      name: 'Example Metabolic Laboratory (demo)',
      addressLines: ['Mitochondrial Section, Building 0', '1 Placeholder Lane', 'Demotown DT0 0XX, Nowhereland'],
      accreditationNumber: 'DEMO-ACC-0000',
      timeZone: 'Europe/Amsterdam',
    },
    patient: {
      name: 'Robin Testperson (demo)',
      labPatientId: 'DEMO-P-004217',
      dateOfBirth: '2016-08-09',
      sex: 'female',
    },
    case: {
      accession: 'DEMO-25-0142',
      referringClinicianName: 'Dr Avery Fictive (demo), Paediatric Neurology',
      clinicalIndication:
        'Exercise intolerance, hypotonia and raised plasma lactate since age 5; suspected oxidative-phosphorylation disorder (demo history).',
      receivedAt: '2025-03-04T08:15:00Z',
      collectedAt: '2025-03-03',
    },
    specimens: [muscleSection()],
    interpretation: [
      'Complex I activity in this muscle specimen is reduced to about one third of the reference mean when expressed relative to citrate synthase, and to about one quarter relative to complex II. The linked NADH:cytochrome c reductase (complex I+III) activity is reduced to a similar degree, while succinate:cytochrome c reductase (complex II+III), complex III and complex IV are within their reference intervals. Citrate synthase is within its interval, so the reduction is not explained by low mitochondrial content.',
      'These findings are consistent with an isolated complex I deficiency. The complex I to complex II ratio falls in the minor-criterion band of the demo rule set. Taken together with the clinical picture described on the request, they support genetic testing of the nuclear and mitochondrial genes that encode complex I subunits and assembly factors.',
      'This is a demonstration report with invented values. In a real case the director would relate the result to the specimen quality, the time from biopsy to freezing and the clinical findings before drawing any conclusion.',
    ].join('\n\n'),
    methods: {
      summary:
        'Spectrophotometric kinetic assays on muscle homogenate (600 g supernatant) at 30 °C, 1 cm pathlength, 40 µg protein per cuvette (demo method). ' +
        'Specific rates are the total rate minus the background rate, converted with the Beer–Lambert law (A = ε·c·l): ' +
        'ε NADH 6.2 mM⁻¹cm⁻¹ at 340 nm; DCPIP 19.1 mM⁻¹cm⁻¹ at 600 nm; cytochrome c 18.5 mM⁻¹cm⁻¹ at 550 nm; TNB 13.6 mM⁻¹cm⁻¹ at 412 nm. ' +
        'Duplicate agreement target ±15%.',
      definitions: [
        { assay: 'CI', version: 3, description: 'Rotenone-sensitive NADH oxidation at 340 nm; ε 6.2 mM⁻¹cm⁻¹ (derived from consensus factors).' },
        { assay: 'CII', version: 2, description: 'DCPIP reduction at 600 nm after succinate; ε 19.1 mM⁻¹cm⁻¹.' },
        { assay: 'CIII', version: 2, description: 'Antimycin A-sensitive cytochrome c reduction at 550 nm; ε 18.5 mM⁻¹cm⁻¹.' },
        { assay: 'CIV', version: 4, description: 'Reduced cytochrome c oxidation at 550 nm, linear early rate; ε 18.5 mM⁻¹cm⁻¹.' },
        { assay: 'CI+III', version: 2, description: 'Rotenone-sensitive cytochrome c reduction at 550 nm; ε 18.5 mM⁻¹cm⁻¹.' },
        { assay: 'CII+III', version: 2, description: 'Cytochrome c reduction at 550 nm with succinate; ε 18.5 mM⁻¹cm⁻¹.' },
        { assay: 'CS', version: 2, description: 'TNB formation from DTNB at 412 nm after oxaloacetate; ε 13.6 mM⁻¹cm⁻¹.' },
      ],
    },
    signature: {
      signerName: 'Dr Sam Placeholder (demo)',
      signerTitle: 'Laboratory Director',
      signedAt: '2025-03-14T09:30:00Z',
      meaning: 'Reviewed and approved for release',
    },
    report: {
      version: 1,
      status: 'final',
      reportDate: '2025-03-14',
      supersedesVersion: null,
      correctionReason: null,
      changesSummary: null,
    },
  };
}

function merge(base: ReportDocument, overrides: ReportDocumentOverrides): unknown {
  const out: Record<string, unknown> = { ...base };
  for (const [key, value] of Object.entries(overrides)) {
    const current = out[key];
    const isSection =
      current !== null && typeof current === 'object' && !Array.isArray(current) && value !== null && typeof value === 'object' && !Array.isArray(value);
    out[key] = isSection ? { ...(current as object), ...(value as object) } : value;
  }
  return out;
}

/** A final report of a demo isolated complex I pattern; sections of `overrides` merge one level deep. */
export function buildReportDocument(overrides: ReportDocumentOverrides = {}): ReportDocument {
  return reportDocumentSchema.parse(merge(baseDocument(), overrides));
}

/** Version 2 of the demo report, correcting a transposed CIV value. */
export function buildCorrectedReportDocument(overrides: ReportDocumentOverrides = {}): ReportDocument {
  return buildReportDocument({
    report: {
      version: 2,
      status: 'corrected',
      reportDate: '2025-03-18',
      supersedesVersion: 1,
      correctionReason: 'Complex IV activity was transcribed from the wrong cuvette pair in version 1.',
      changesSummary: 'CIV activity changed from 58.2 to 85.2 nmol/min/mg protein; CIV ratios and the pattern summary updated.',
    },
    signature: { signedAt: '2025-03-18T14:05:00Z', meaning: 'Reviewed and approved for release as a correction' },
    ...overrides,
  });
}

/** A specimen rejected on receipt: no results, rejection reason and disposition on the report. */
export function buildRejectedReportDocument(overrides: ReportDocumentOverrides = {}): ReportDocument {
  return buildReportDocument({
    specimens: [rejectedMuscleSection()],
    interpretation: 'No enzyme analysis was possible. Please send a new biopsy frozen in liquid nitrogen and shipped on dry ice.',
    methods: { summary: 'No assays were performed on this specimen.', definitions: [] },
    ...overrides,
  });
}

/** A case with two specimens: A, skeletal muscle, and B, liver, both accepted with results. */
export function buildTwoSpecimenReportDocument(overrides: ReportDocumentOverrides = {}): ReportDocument {
  const muscle = muscleSection();
  return buildReportDocument({
    specimens: [
      { ...muscle, specimen: { ...muscle.specimen, label: 'A', description: `Specimen A, ${muscle.specimen.description}` } },
      liverSection(),
    ],
    interpretation:
      'Muscle (specimen A) shows an isolated complex I pattern and liver (specimen B) a low complex IV activity. ' +
      'Demonstration text with invented values.',
    ...overrides,
  });
}

/**
 * A copy of `doc` with one result row of one specimen section changed (or removed when `change` answers null).
 */
export function withResultRow(
  doc: ReportDocument,
  sectionIndex: number,
  assay: string,
  measure: string,
  change: (r: ReportResult) => ReportResult | null,
): ReportDocument {
  const copy = structuredClone(doc);
  const section = copy.specimens[sectionIndex]!;
  section.results = section.results.flatMap((r) =>
    r.assay === assay && r.measure === measure ? [change(r)].filter((x): x is ReportResult => x !== null) : [r],
  );
  return copy;
}
