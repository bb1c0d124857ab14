import { z } from 'zod';
import { assayCodeSchema, isIanaTimeZone, measureSchema, specimenTypeSchema } from './common';

/**
 * Everything the signed interpretive report prints, as one plain object. The PDF renderer reads only
 * this; whoever builds it (the report service) copies frozen values at signing time, so the same
 * document always renders to the same bytes.
 */

/** The caution every Cristae report carries (product brief, in Cristae's own words). */
export const reportCaution =
  'These results are laboratory measurements. They support, and do not replace, a diagnosis made by a ' +
  'licensed clinician. How they are read depends on the specimen, how it was collected, transported and ' +
  'handled, and on the clinical picture. Local regulations and the laboratory’s accreditation rules ' +
  'govern how results are reported and released.';

const text = z.string().trim().min(1, 'Required');
const optionalText = z.string().trim().min(1, 'Must not be blank when given').nullable();
const isoDate = z.iso.date({ message: 'Expected a date as YYYY-MM-DD' });
const isoDateTime = z.iso.datetime({
  offset: true,
  message: 'Expected an ISO 8601 date-time with Z or an offset, e.g. 2025-03-14T09:30:00Z',
});

export const reportLaboratorySchema = z.object({
  name: text,
  addressLines: z.array(text).min(1, 'At least one address line').max(6, 'At most 6 address lines'),
  accreditationNumber: text,
  /** The laboratory's telephone number, printed under the address (absent in reports signed before it was). */
  phone: text.optional(),
  /** IANA zone used to print date-times (receipt, signature); UTC when absent. */
  timeZone: z
    .string()
    .refine(isIanaTimeZone, { message: 'Unknown IANA time zone, e.g. Europe/Amsterdam' })
    .optional(),
});

export const reportSexSchema = z.enum(['female', 'male', 'other', 'unknown']);
export const reportSexLabels: Record<z.infer<typeof reportSexSchema>, string> = {
  female: 'Female',
  male: 'Male',
  other: 'Other',
  unknown: 'Not stated',
};

export const reportPatientSchema = z.object({
  name: text,
  labPatientId: text,
  dateOfBirth: isoDate,
  sex: reportSexSchema,
  /** Age on the collection day as printed, e.g. '1 year 3 months' (absent in reports signed before it was). */
  ageAtCollection: text.optional(),
});

export const reportCaseSchema = z.object({
  accession: text,
  referringClinicianName: text,
  clinicalIndication: text,
  receivedAt: isoDateTime,
  /** A date when only the day of collection is known; null when it was not recorded. */
  collectedAt: z.union([isoDate, isoDateTime]).nullable(),
});

export const reportSpecimenSchema = z.object({
  /** The laboratory's label of the specimen within the case, e.g. 'A'; printed in section titles. */
  label: text.optional(),
  type: specimenTypeSchema,
  /** Source and description, e.g. 'Left vastus lateralis, open biopsy, 48 mg'. */
  description: text,
  conditionOnReceipt: text,
  accepted: z.boolean(),
  rejectionReason: optionalText,
  /** What was done with a rejected specimen (discarded, kept, returned); CLIA 493.1291(c)(7). */
  disposition: optionalText,
});

export const resultStatusSchema = z.enum(['below', 'within', 'above', 'not_compared']);
export const criterionBandSchema = z.enum(['major', 'minor']);

export const reportResultSchema = z.object({
  assay: assayCodeSchema,
  assayName: text,
  measure: measureSchema,
  value: z.number().finite().nullable(),
  /** Printed as given, e.g. 'nmol/min/mg protein' or 'ratio'. */
  unit: text,
  referenceLower: z.number().finite().nullable(),
  referenceUpper: z.number().finite().nullable(),
  referenceMean: z.number().finite().nullable(),
  /** Null (with intervalVersion) when no reference interval exists for the specimen type and age. */
  intervalLabel: text.nullable(),
  intervalVersion: z.number().int().positive().nullable(),
  status: resultStatusSchema,
  pctOfMean: z.number().finite().nullable(),
  criterionBand: criterionBandSchema.nullable(),
  /** Why the band stands although the pattern shows no deficiency (printed with the row's notes). */
  criterionBandNote: optionalText.optional(),
  /** Criterion thresholds (% of mean) the band was decided against; the printed % never crosses them. */
  pctThresholds: z.array(z.number().finite()).max(4).optional(),
  flags: z.array(text),
  /** Reporting precision set by the assay definition; significant-figure rule when absent. */
  decimals: z.number().int().min(0).max(6).optional(),
});

export const reportGraphicBarSchema = z.object({
  assay: assayCodeSchema,
  pctOfMeanRatioCs: z.number().finite().min(0).nullable(),
  pctOfMeanRatioCii: z.number().finite().min(0).nullable(),
});

export const reportGraphicSchema = z.object({
  bars: z.array(reportGraphicBarSchema),
  /** Shading of the criterion bands, from the director-approved rule set; null prints no shading. */
  criterionBands: z
    .object({
      majorBelowPct: z.number().positive().max(100),
      minorBelowPct: z.number().positive().max(100),
      ruleSetLabel: text,
    })
    .refine((b) => b.majorBelowPct < b.minorBelowPct, {
      message: 'majorBelowPct must be below minorBelowPct',
      path: ['majorBelowPct'],
    })
    .nullable(),
});

/** A replicate measured but left out of the results, printed in the methods section with its reason. */
export const reportExcludedReplicateSchema = z.object({
  /** The specimen label, e.g. 'A'. */
  specimenLabel: text,
  assay: assayCodeSchema,
  replicate: z.number().int().positive(),
  /** The replicate's own activity as measured; null when it gave none. */
  value: z.number().finite().nullable(),
  unit: text,
  reason: text,
  /** Who excluded it (the account's name). */
  by: text,
});
export type ReportExcludedReplicate = z.infer<typeof reportExcludedReplicateSchema>;

/** An analytical run the reported results came from, with the release of its quality control. */
export const reportRunSchema = z.object({
  runNumber: text,
  /** 'accept' | 'warn' | 'reject' | 'none' as the run was judged. */
  qcStatus: z.enum(['accept', 'warn', 'reject', 'none']),
  /** The director's reason when the run was released despite its controls; null otherwise. */
  overrideReason: z.string().nullable(),
  /** What came from the run, e.g. "specimen A: CI, CS". */
  results: text,
  /** The sentence printed, e.g. "quality control accepted". */
  statement: text,
});
export type ReportRun = z.infer<typeof reportRunSchema>;

export const reportMethodsSchema = z.object({
  /** Brief method and constant sources, e.g. 'Beer–Lambert, ε NADH 6.2 mM⁻¹cm⁻¹ at 340 nm'. */
  summary: text,
  definitions: z.array(
    z.object({
      assay: assayCodeSchema,
      version: z.number().int().positive(),
      description: text,
    }),
  ),
  /** Versions used that their own drafter approved (a single-director laboratory); absent when none were. */
  selfApproval: text.optional(),
  /** Replicates excluded from the calculations, with reason and by whom (absent in reports signed before). */
  excludedReplicates: z.array(reportExcludedReplicateSchema).max(200).optional(),
  /** The analytical runs the results came from and their quality control (absent when none came from a run). */
  runs: z.array(reportRunSchema).max(200).optional(),
});

export const reportSignatureSchema = z.object({
  signerName: text,
  signerTitle: text,
  signedAt: isoDateTime,
  /** The meaning of the signature (21 CFR Part 11), e.g. 'Reviewed and approved for release'. */
  meaning: text,
});

export const reportStatusSchema = z.enum(['final', 'corrected']);

/**
 * One printed value that differs between the version a corrected report supersedes and the corrected report,
 * as both print it (e.g. item 'CI ratio to CS: % of ref. mean', before '42%', after '71%').
 */
export const changedValueSchema = z.object({
  /** The specimen label when the case has several specimens; null with one. */
  specimen: z.string().nullable(),
  item: text,
  before: text,
  after: text,
});
export type ChangedValue = z.infer<typeof changedValueSchema>;

export const reportMetaSchema = z.object({
  version: z.number().int().positive(),
  status: reportStatusSchema,
  reportDate: isoDate,
  supersedesVersion: z.number().int().positive().nullable(),
  correctionReason: optionalText,
  changesSummary: optionalText,
  /** Corrected reports signed after a reopening list every printed value that changed (absent before that). */
  changedValues: z.array(changedValueSchema).max(400).optional(),
});

/**
 * One specimen of the case as the report prints it: its description and condition, and for an accepted
 * specimen its results, bar graphic and pattern line. Every result stands under its specimen (CLIA
 * 493.1291(c)(5),(6)); a rejected specimen carries its reason and disposition (c)(7).
 */
export const reportSpecimenSectionSchema = z.object({
  specimen: reportSpecimenSchema,
  results: z.array(reportResultSchema),
  graphic: reportGraphicSchema,
  /** Null when there is nothing to summarise (e.g. a rejected specimen). */
  patternSummary: optionalText,
});

type SpecimenSection = z.infer<typeof reportSpecimenSectionSchema>;

function checkSection(section: SpecimenSection, base: Array<string | number>, ctx: z.RefinementCtx): void {
  const { specimen } = section;
  if (specimen.accepted) {
    for (const key of ['rejectionReason', 'disposition'] as const) {
      if (specimen[key] !== null) {
        ctx.addIssue({
          code: 'custom',
          path: [...base, 'specimen', key],
          message: 'Only a rejected specimen has this; use null for an accepted specimen',
        });
      }
    }
  } else {
    for (const key of ['rejectionReason', 'disposition'] as const) {
      if (specimen[key] === null) {
        ctx.addIssue({
          code: 'custom',
          path: [...base, 'specimen', key],
          message: 'Required for a rejected specimen',
        });
      }
    }
    if (section.results.length > 0) {
      ctx.addIssue({ code: 'custom', path: [...base, 'results'], message: 'A rejected specimen has no results' });
    }
    if (section.graphic.bars.length > 0) {
      ctx.addIssue({ code: 'custom', path: [...base, 'graphic', 'bars'], message: 'A rejected specimen has no graphic' });
    }
  }
  const seen = new Set<string>();
  section.results.forEach((r, i) => {
    const key = `${r.assay}/${r.measure}`;
    if (seen.has(key)) {
      ctx.addIssue({
        code: 'custom',
        path: [...base, 'results', i],
        message: `Duplicate result for ${r.assay} ${r.measure}`,
      });
    }
    seen.add(key);
    if (r.referenceLower !== null && r.referenceUpper !== null && r.referenceLower > r.referenceUpper) {
      ctx.addIssue({
        code: 'custom',
        path: [...base, 'results', i, 'referenceLower'],
        message: 'Lower reference limit is above the upper limit',
      });
    }
    if ((r.intervalLabel === null) !== (r.intervalVersion === null)) {
      ctx.addIssue({
        code: 'custom',
        path: [...base, 'results', i, 'intervalVersion'],
        message: 'Give both the interval label and its version, or neither',
      });
    }
    if (r.intervalLabel === null) {
      if (r.referenceLower !== null || r.referenceUpper !== null || r.referenceMean !== null) {
        ctx.addIssue({
          code: 'custom',
          path: [...base, 'results', i, 'intervalLabel'],
          message: 'Reference limits need the interval they come from',
        });
      }
      if (r.status !== 'not_compared') {
        ctx.addIssue({
          code: 'custom',
          path: [...base, 'results', i, 'status'],
          message: "A result without a reference interval must have status 'not_compared'",
        });
      }
    }
    if (r.value === null && r.status !== 'not_compared') {
      ctx.addIssue({
        code: 'custom',
        path: [...base, 'results', i, 'status'],
        message: "A result without a value must have status 'not_compared'",
      });
    }
  });
}

export const reportDocumentSchema = z
  .object({
    laboratory: reportLaboratorySchema,
    patient: reportPatientSchema,
    case: reportCaseSchema,
    /** Every specimen of the case, in the case's order; each prints as its own section. */
    specimens: z.array(reportSpecimenSectionSchema).min(1, 'At least one specimen'),
    interpretation: text,
    methods: reportMethodsSchema,
    signature: reportSignatureSchema,
    report: reportMetaSchema,
  })
  .superRefine((doc, ctx) => {
    const { report } = doc;
    if (report.status === 'corrected') {
      if (report.supersedesVersion === null) {
        ctx.addIssue({
          code: 'custom',
          path: ['report', 'supersedesVersion'],
          message: 'A corrected report must name the version it supersedes',
        });
      } else if (report.supersedesVersion >= report.version) {
        ctx.addIssue({
          code: 'custom',
          path: ['report', 'supersedesVersion'],
          message: 'Must be an earlier version than report.version',
        });
      }
      for (const key of ['correctionReason', 'changesSummary'] as const) {
        if (report[key] === null) {
          ctx.addIssue({
            code: 'custom',
            path: ['report', key],
            message: 'Required for a corrected report',
          });
        }
      }
    } else {
      for (const key of ['supersedesVersion', 'correctionReason', 'changesSummary'] as const) {
        if (report[key] !== null) {
          ctx.addIssue({
            code: 'custom',
            path: ['report', key],
            message: 'Only a corrected report has this; use null for a final report',
          });
        }
      }
    }
    const labels = new Set<string>();
    doc.specimens.forEach((section, i) => {
      checkSection(section, ['specimens', i], ctx);
      const label = section.specimen.label;
      if (label !== undefined) {
        if (labels.has(label)) {
          ctx.addIssue({
            code: 'custom',
            path: ['specimens', i, 'specimen', 'label'],
            message: `Duplicate specimen label ${label}`,
          });
        }
        labels.add(label);
      }
    });
  });

export type ReportDocument = z.infer<typeof reportDocumentSchema>;
export type ReportSpecimenSection = z.infer<typeof reportSpecimenSectionSchema>;
export type ReportSpecimen = z.infer<typeof reportSpecimenSchema>;
export type ReportResult = z.infer<typeof reportResultSchema>;
export type ReportGraphic = z.infer<typeof reportGraphicSchema>;
export type ReportGraphicBar = z.infer<typeof reportGraphicBarSchema>;
export type ResultStatus = z.infer<typeof resultStatusSchema>;
export type ReportSex = z.infer<typeof reportSexSchema>;
