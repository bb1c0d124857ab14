import { z } from 'zod';
import { physicalNumber } from './assay';
import { birthDateSchema, calendarDateSchema, dateTimeSchema, plainText, specimenTypeSchema } from './common';

/** The workflow states, trade terms kept as the brief names them. */
export const caseStates = ['received', 'in_assay', 'awaiting_review', 'final', 'corrected', 'cancelled'] as const;
export const caseStateSchema = z.enum(caseStates);
export type CaseState = z.infer<typeof caseStateSchema>;
export const caseStateLabels: Record<CaseState, string> = {
  received: 'Received',
  in_assay: 'In assay',
  awaiting_review: 'Awaiting review',
  final: 'Final',
  corrected: 'Corrected',
  cancelled: 'Cancelled',
};

export const priorities = ['routine', 'urgent'] as const;
export const prioritySchema = z.enum(priorities);
export type Priority = z.infer<typeof prioritySchema>;

export const sexes = ['female', 'male', 'other', 'unknown'] as const;
export const sexSchema = z.enum(sexes);

export const transportConditions = ['liquid_nitrogen', 'dry_ice', 'chilled', 'ambient', 'thawed', 'unknown'] as const;
export const transportConditionSchema = z.enum(transportConditions);
export const transportConditionLabels: Record<z.infer<typeof transportConditionSchema>, string> = {
  liquid_nitrogen: 'Frozen in liquid nitrogen',
  dry_ice: 'Frozen on dry ice',
  chilled: 'Chilled (2–8 °C)',
  ambient: 'Ambient temperature',
  thawed: 'Arrived thawed',
  unknown: 'Not stated',
};

/* ---------------------------------------------------------------- patients */

export const patientSchema = z.object({
  id: z.number().int(),
  labPatientId: z.string(),
  familyName: z.string(),
  givenName: z.string(),
  dateOfBirth: z.string(),
  sex: sexSchema,
  version: z.number().int(),
});
export type Patient = z.infer<typeof patientSchema>;

const patientFieldsSchema = z
  .object({
    labPatientId: z
      .string()
      .trim()
      .min(1, 'Lab patient ID is required')
      .max(40, 'Use at most 40 characters')
      .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, 'Use letters, digits, dot, dash or underscore'),
    familyName: z.string().trim().min(1, 'Family name is required').max(80).superRefine(plainText('Family name')),
    givenName: z.string().trim().min(1, 'Given name is required').max(80).superRefine(plainText('Given name')),
    dateOfBirth: birthDateSchema,
    sex: sexSchema,
  })
  .strict();

/**
 * Registering (or correcting) a genuinely different person who shares a name and date of birth with a registered
 * patient: the id of that patient and the reason, recorded in the audit trail. Both or neither.
 */
const distinctPersonFields = {
  confirmDistinctFrom: z.number({ error: 'Give the id of the patient this person is not' }).int().positive().optional(),
  distinctReason: z
    .string()
    .trim()
    .min(5, 'Say how you know this is a different person')
    .max(500, 'Use at most 500 characters')
    .superRefine(plainText('Reason'))
    .optional(),
};
function bothOrNeither(v: { confirmDistinctFrom?: number; distinctReason?: string }, ctx: z.RefinementCtx): void {
  if (v.confirmDistinctFrom !== undefined && !v.distinctReason) {
    ctx.addIssue({ code: 'custom', path: ['distinctReason'], message: 'Say how you know this is a different person' });
  }
  if (v.distinctReason !== undefined && v.confirmDistinctFrom === undefined) {
    ctx.addIssue({ code: 'custom', path: ['confirmDistinctFrom'], message: 'Name the registered patient this person is not' });
  }
}

export const createPatientInputSchema = patientFieldsSchema.extend(distinctPersonFields).strict().superRefine(bothOrNeither);
export type CreatePatientInput = z.infer<typeof createPatientInputSchema>;

export const patientSearchQuerySchema = z.object({ q: z.string().trim().max(80).optional() }).strict();
export type PatientSearchQuery = z.infer<typeof patientSearchQuerySchema>;

/** Corrections to a patient's details, with the version the editor saw. */
export const updatePatientInputSchema = patientFieldsSchema
  .partial()
  .extend({ version: z.number().int().min(0), ...distinctPersonFields })
  .strict()
  .superRefine(bothOrNeither);
export type UpdatePatientInput = z.infer<typeof updatePatientInputSchema>;

/**
 * A 409 for a duplicate patient names the clashing field(s) in `fields` and carries the existing patient's id
 * under this key, so the form can offer to use that patient instead.
 */
export const EXISTING_PATIENT_FIELD = 'existingPatientId';

/* ---------------------------------------------------------------- specimens */

export const specimenSchema = z.object({
  id: z.number().int(),
  caseId: z.number().int(),
  label: z.string(),
  type: specimenTypeSchema,
  source: z.string(),
  collectedAt: z.string().nullable(),
  receivedAt: z.string(),
  transportCondition: transportConditionSchema,
  wetWeightMg: z.number().nullable(),
  accepted: z.boolean(),
  rejectionReason: z.string().nullable(),
  proteinMgPerMl: z.number().nullable(),
  proteinSource: z.string().nullable(),
  version: z.number().int(),
});
export type Specimen = z.infer<typeof specimenSchema>;

/** The fields of a specimen as received; the input schemas below add their rules to this one shape. */
export const specimenFieldsSchema = z.object({
  type: specimenTypeSchema,
  source: z.string().trim().max(160, 'Use at most 160 characters').superRefine(plainText('Source')),
  collectedAt: dateTimeSchema('Collection date and time').nullable(),
  receivedAt: dateTimeSchema('Receipt date and time'),
  transportCondition: transportConditionSchema,
  wetWeightMg: z
    .number({ error: 'Give the wet weight in mg, or leave it empty' })
    .positive('Wet weight must be above 0')
    .max(100000, 'Wet weight is at most 100 000 mg')
    .nullable(),
  accepted: z.boolean(),
  rejectionReason: z.string().trim().max(200, 'Use at most 200 characters').superRefine(plainText('Rejection reason')).nullable(),
});

export const receiveSpecimenInputSchema = specimenFieldsSchema
  .strict()
  .refine((s) => s.accepted || (s.rejectionReason && s.rejectionReason.length > 0), {
    path: ['rejectionReason'],
    message: 'Give the reason the specimen is rejected',
  })
  .refine((s) => !s.collectedAt || Date.parse(s.collectedAt) <= Date.parse(s.receivedAt), {
    path: ['collectedAt'],
    message: 'Collection cannot be after receipt',
  });
export type ReceiveSpecimenInput = z.infer<typeof receiveSpecimenInputSchema>;

/**
 * Changes to a received specimen (corrections, or recording a rejection), with the version the editor saw.
 * The type is fixed once received: a different tissue is a different specimen.
 */
export const updateSpecimenInputSchema = specimenFieldsSchema
  .omit({ type: true })
  .partial()
  .extend({ version: z.number().int().min(0) })
  .strict()
  .refine((s) => s.accepted !== false || (s.rejectionReason && s.rejectionReason.length > 0), {
    path: ['rejectionReason'],
    message: 'Give the reason the specimen is rejected',
  })
  .refine((s) => !s.collectedAt || !s.receivedAt || Date.parse(s.collectedAt) <= Date.parse(s.receivedAt), {
    path: ['collectedAt'],
    message: 'Collection cannot be after receipt',
  });
export type UpdateSpecimenInput = z.infer<typeof updateSpecimenInputSchema>;

export const setProteinInputSchema = z
  .object({
    proteinMgPerMl: physicalNumber('proteinMgPerMl', 'Protein'),
    proteinSource: z.string().trim().min(1).max(200).superRefine(plainText('Protein source')),
    version: z.number().int().min(0),
  })
  .strict();
export type SetProteinInput = z.infer<typeof setProteinInputSchema>;

export const rejectionReasonSchema = z.object({ id: z.number().int(), text: z.string(), active: z.boolean() });
export type RejectionReason = z.infer<typeof rejectionReasonSchema>;
export const createRejectionReasonInputSchema = z
  .object({ text: z.string().trim().min(3, 'Give a reason of at least 3 characters').max(200).superRefine(plainText('Reason')) })
  .strict();
export type CreateRejectionReasonInput = z.infer<typeof createRejectionReasonInputSchema>;

/* ---------------------------------------------------------------- cases */

export const caseSummarySchema = z.object({
  id: z.number().int(),
  accession: z.string(),
  state: caseStateSchema,
  patientName: z.string(),
  specimenTypes: z.array(specimenTypeSchema),
  receivedAt: z.string().nullable(),
  priority: prioritySchema,
  patternCode: z.string().nullable(),
  referringClinicianName: z.string().nullable(),
});
export type CaseSummary = z.infer<typeof caseSummarySchema>;

export const caseDetailSchema = z.object({
  id: z.number().int(),
  accession: z.string(),
  state: caseStateSchema,
  priority: prioritySchema,
  clinicalIndication: z.string(),
  patient: patientSchema,
  referringClinician: z.object({ id: z.number().int(), name: z.string(), email: z.string() }),
  specimens: z.array(specimenSchema),
  cancelReason: z.string().nullable(),
  returnReason: z.string().nullable(),
  /** While a signed case is reopened for a correction: the director's reason and when (else null). */
  amendReason: z.string().nullable(),
  amendedAt: z.string().nullable(),
  createdAt: z.string(),
  version: z.number().int(),
  receivedAt: z.string().nullable(),
  patternCode: z.string().nullable(),
});
export type CaseDetail = z.infer<typeof caseDetailSchema>;

export const createCaseInputSchema = z
  .object({
    patientId: z.number({ error: 'Choose or register the patient' }).int().positive('Choose or register the patient'),
    referringClinicianId: z.number({ error: 'Choose the referring clinician' }).int().positive('Choose the referring clinician'),
    clinicalIndication: z
      .string()
      .trim()
      .min(3, 'Describe the clinical indication')
      .max(2000)
      .superRefine(plainText('Clinical indication', true)),
    priority: prioritySchema,
  })
  .strict();
export type CreateCaseInput = z.infer<typeof createCaseInputSchema>;

/** Registering a case receives its first specimen in the same step (and the same transaction). */
export const registerCaseInputSchema = createCaseInputSchema.extend({ specimen: receiveSpecimenInputSchema }).strict();
export type RegisterCaseInput = z.infer<typeof registerCaseInputSchema>;

export const updateCaseInputSchema = createCaseInputSchema
  .pick({ referringClinicianId: true, clinicalIndication: true, priority: true })
  .partial()
  .extend({ version: z.number().int().min(0) })
  .strict();
export type UpdateCaseInput = z.infer<typeof updateCaseInputSchema>;

export const reasonInputSchema = z
  .object({
    reason: z.string().trim().min(3, 'Give a reason').max(1000).superRefine(plainText('Reason', true)),
    version: z.number().int().min(0),
  })
  .strict();
export type ReasonInput = z.infer<typeof reasonInputSchema>;

export const versionInputSchema = z.object({ version: z.number().int().min(0) }).strict();

export const caseSortFields = ['accession', 'receivedAt', 'state', 'patientName', 'priority'] as const;

/** The list query. API contract: page, pageSize (at most 200), q, state; the rest are Cristae's filters. */
export const caseListQuerySchema = z
  .object({
    page: z.coerce.number().int().min(1, 'page starts at 1').optional(),
    pageSize: z.coerce.number().int().min(1).max(200, 'pageSize is at most 200').optional(),
    q: z.string().trim().max(80).optional(),
    state: caseStateSchema.optional(),
    specimenType: specimenTypeSchema.optional(),
    pattern: z.string().trim().max(40).optional(),
    from: calendarDateSchema({ label: 'From date' }).optional(),
    to: calendarDateSchema({ label: 'To date' }).optional(),
    sort: z.enum(caseSortFields).optional(),
    dir: z.enum(['asc', 'desc']).optional(),
  })
  .strict();
export type CaseListQuery = z.infer<typeof caseListQuerySchema>;

export const caseListSchema = z.object({ items: z.array(caseSummarySchema), total: z.number().int() });
export type CaseList = z.infer<typeof caseListSchema>;

/* ---------------------------------------------------------------- history */

export const caseHistoryChangeSchema = z.object({
  field: z.string(),
  before: z.string().nullable(),
  after: z.string().nullable(),
  /** The unit both values are in ("mg/mL"), so the history can say "from 4.1 to 4.25 mg/mL". */
  unit: z.string().optional(),
});
export type CaseHistoryChange = z.infer<typeof caseHistoryChangeSchema>;

/** One audit event as the case history shows it: who, when, what, and the fields it changed. */
export const caseHistoryEventSchema = z.object({
  id: z.number().int(),
  at: z.string(),
  actorName: z.string().nullable(),
  actorEmail: z.string().nullable(),
  action: z.string(),
  entity: z.string(),
  entityId: z.string().nullable(),
  summary: z.string(),
  note: z.string().nullable(),
  changes: z.array(caseHistoryChangeSchema),
});
export type CaseHistoryEvent = z.infer<typeof caseHistoryEventSchema>;
export const caseHistorySchema = z.object({ items: z.array(caseHistoryEventSchema) });
