import { z } from 'zod';
import { caseDetailSchema, caseStateSchema, prioritySchema } from './case';
import { changedValueSchema, reportRunSchema } from './report-document';
import { plainText, specimenTypeSchema } from './common';

/*
 * Signed reports, the director's review and the e-mail notices. The shapes of GET /api/reports and of the
 * sign request are an API contract (docs/api.md): change them only additively and in step with the tests.
 */

/** A report version as listed: final, corrected, or superseded by a later version. */
export const reportStatuses = ['final', 'corrected', 'superseded'] as const;
export const reportListStatusSchema = z.enum(reportStatuses);
export type ReportListStatus = z.infer<typeof reportListStatusSchema>;
export const reportStatusLabels: Record<ReportListStatus, string> = {
  final: 'Final',
  corrected: 'Corrected',
  superseded: 'Superseded',
};

/** One element of GET /api/reports (the API contract: exactly these keys). */
export const reportListItemSchema = z.object({
  id: z.number().int(),
  caseId: z.number().int(),
  accession: z.string(),
  version: z.number().int(),
  status: reportListStatusSchema,
  signedAt: z.string(),
  signedBy: z.string(),
});
export type ReportListItem = z.infer<typeof reportListItemSchema>;
export const reportListSchema = z.array(reportListItemSchema);

/** One report version with what a reader needs to tell it apart and trust it. */
export const reportDetailSchema = reportListItemSchema.extend({
  patientName: z.string(),
  labPatientId: z.string(),
  dateOfBirth: z.string(),
  specimenType: specimenTypeSchema.nullable(),
  specimenLabel: z.string().nullable(),
  referringClinicianName: z.string(),
  patternSummary: z.string().nullable(),
  interpretation: z.string(),
  meaning: z.string(),
  signerTitle: z.string(),
  correctionReason: z.string().nullable(),
  changesSummary: z.string().nullable(),
  supersedesVersion: z.number().int().nullable(),
  supersededByVersion: z.number().int().nullable(),
  supersededAt: z.string().nullable(),
  /** For a corrected version: every printed value that differs from the version it supersedes (else empty). */
  changedValues: z.array(changedValueSchema),
  /** The analytical runs the results came from and their quality control, as printed (empty when none). */
  runs: z.array(reportRunSchema),
  pdfSha256: z.string(),
  pdfSizeBytes: z.number().int(),
  documentSha256: z.string(),
});
export type ReportDetail = z.infer<typeof reportDetailSchema>;

/** The reports of one case, newest version first (GET /api/reports/by-case). */
export const caseReportsSchema = z.object({
  caseId: z.number().int(),
  accession: z.string(),
  patientName: z.string(),
  dateOfBirth: z.string(),
  referringClinicianName: z.string(),
  /** True while the laboratory has reopened the signed case to correct it; the signed reports stay as they are. */
  underAmendment: z.boolean(),
  reports: z.array(reportDetailSchema),
});
export type CaseReports = z.infer<typeof caseReportsSchema>;
export const caseReportsListSchema = z.array(caseReportsSchema);

/**
 * A referred case the laboratory has not reported yet (GET /api/reports/in-progress): who and what, and how
 * far the work has gone, in plain words. Never any result, draft or reviewer's note.
 */
export const inProgressStates = ['received', 'in_assay', 'awaiting_review'] as const;
export const inProgressStateSchema = z.enum(inProgressStates);
export type InProgressState = z.infer<typeof inProgressStateSchema>;
export const inProgressStateWords: Record<InProgressState, string> = {
  received: 'Specimen received; testing has not started yet',
  in_assay: 'Being tested in the laboratory',
  awaiting_review: 'Testing done; waiting for the director to check and sign',
};
export const inProgressCaseSchema = z
  .object({
    caseId: z.number().int(),
    accession: z.string(),
    patientName: z.string(),
    specimenTypes: z.array(specimenTypeSchema),
    state: inProgressStateSchema,
    receivedAt: z.string().nullable(),
  })
  .strict();
export type InProgressCase = z.infer<typeof inProgressCaseSchema>;
export const inProgressListSchema = z.object({ items: z.array(inProgressCaseSchema) });

/* ---------------------------------------------------------------- signing */

export const DEFAULT_SIGNATURE_MEANING = 'Reviewed and approved for release';
export const DEFAULT_CORRECTION_MEANING = 'Reviewed and approved for release as a correction';

/** Meanings offered in the signing form; the director may write another. */
export const signatureMeanings = [
  DEFAULT_SIGNATURE_MEANING,
  'Reviewed, interpreted and approved for release',
  DEFAULT_CORRECTION_MEANING,
] as const;

const password = z.string().min(1, 'Enter your password to sign').max(200);
const meaning = z
  .string()
  .trim()
  .min(3, 'Say what the signature means, e.g. "Reviewed and approved for release"')
  .max(200, 'Use at most 200 characters')
  .superRefine(plainText('Meaning'));
export const INTERPRETATION_MAX = 8000;
const interpretation = z
  .string()
  .trim()
  .min(10, 'Write the interpretation (at least 10 characters)')
  .max(INTERPRETATION_MAX, `Use at most ${INTERPRETATION_MAX} characters`)
  .superRefine(plainText('Interpretation', true));
const caseVersion = z.number().int().min(0);

/**
 * POST /api/cases/:id/sign. The password is checked again (the second identity component of the signature).
 * Without `interpretation`, the saved draft is signed, or Cristae's proposal when there is no draft; without
 * `meaning`, DEFAULT_SIGNATURE_MEANING. `version` is the case version the director reviewed.
 */
export const signCaseInputSchema = z
  .object({ password, meaning: meaning.optional(), interpretation: interpretation.optional(), version: caseVersion.optional() })
  .strict();
export type SignCaseInput = z.infer<typeof signCaseInputSchema>;

const correctionReason = z
  .string()
  .trim()
  .min(3, 'Say why the report is corrected')
  .max(1000, 'Use at most 1000 characters')
  .superRefine(plainText('Reason', true));

/**
 * POST /api/cases/:id/amend: a director reopens a signed (final or corrected) case so its results can be
 * corrected, types the password again as for a signature, and says why. `version` is the case version seen.
 */
export const amendCaseInputSchema = z
  .object({
    reason: z
      .string({ error: 'Say why the signed report must be amended' })
      .trim()
      .min(3, 'Say why the signed report must be amended')
      .max(1000, 'Use at most 1000 characters')
      .superRefine(plainText('Reason', true)),
    password: z.string({ error: 'Enter your password to reopen the case' }).min(1, 'Enter your password to reopen the case').max(200),
    version: caseVersion.optional(),
  })
  .strict();
export type AmendCaseInput = z.infer<typeof amendCaseInputSchema>;

/** What every screen shows beside the signed reports of a reopened case (never printed in a stored PDF). */
export const UNDER_AMENDMENT_NOTE = 'This report is being amended by the laboratory; a corrected version will follow.';

/**
 * POST /api/cases/:id/correct: a new, signed version that supersedes the current one. On a case reopened with
 * /amend and submitted again, it carries the results frozen at that submission and lists the changed values.
 */
export const correctReportInputSchema = z
  .object({
    password,
    reason: correctionReason,
    changesSummary: z
      .string()
      .trim()
      .min(3, 'Say what changed')
      .max(2000, 'Use at most 2000 characters')
      .superRefine(plainText('Summary of changes', true)),
    interpretation: interpretation.optional(),
    meaning: meaning.optional(),
    version: caseVersion.optional(),
  })
  .strict();
export type CorrectReportInput = z.infer<typeof correctReportInputSchema>;

/** The form fields of the sign panel (the password is typed, never kept). */
export const signFormSchema = z.object({ interpretation, meaning, password });
export type SignFormValues = z.infer<typeof signFormSchema>;
export const correctFormSchema = z.object({
  interpretation,
  meaning,
  password,
  reason: correctReportInputSchema.shape.reason,
  changesSummary: correctReportInputSchema.shape.changesSummary,
});
export type CorrectFormValues = z.infer<typeof correctFormSchema>;

/**
 * PUT /api/review/:id/draft: the director's working text, with the draft version they started from. The same
 * rules as signing (at least 10 characters), so a draft that saves is never one that cannot be signed.
 */
export const saveDraftInputSchema = z
  .object({
    interpretation,
    version: z.number().int().min(0).nullable(),
  })
  .strict();
export type SaveDraftInput = z.infer<typeof saveDraftInputSchema>;

export const interpretationDraftSchema = z.object({
  interpretation: z.string(),
  version: z.number().int(),
  updatedAt: z.string(),
  updatedByName: z.string().nullable(),
});
export type InterpretationDraft = z.infer<typeof interpretationDraftSchema>;

/* ---------------------------------------------------------------- review */

export const reviewQueueItemSchema = z.object({
  caseId: z.number().int(),
  accession: z.string(),
  patientName: z.string(),
  priority: prioritySchema,
  specimenTypes: z.array(specimenTypeSchema),
  receivedAt: z.string().nullable(),
  /** When the case was last submitted for review. */
  submittedAt: z.string().nullable(),
  submittedByName: z.string().nullable(),
  referringClinicianName: z.string().nullable(),
  patternCode: z.string().nullable(),
  patternSummary: z.string().nullable(),
  version: z.number().int(),
});
export type ReviewQueueItem = z.infer<typeof reviewQueueItemSchema>;
export const reviewQueueSchema = z.object({ items: z.array(reviewQueueItemSchema) });

/** Cristae's proposed wording and the lines it was built from. */
export const interpretationProposalSchema = z.object({
  patternSummary: z.string().nullable(),
  interpretation: z.string(),
});
export type InterpretationProposal = z.infer<typeof interpretationProposalSchema>;

export const reviewCaseSchema = z.object({
  case: caseDetailSchema,
  state: caseStateSchema,
  /** The specimen the report is about (first accepted specimen with results, else the first specimen). */
  reportedSpecimenId: z.number().int().nullable(),
  proposal: interpretationProposalSchema,
  draft: interpretationDraftSchema.nullable(),
  reports: z.array(reportDetailSchema),
  /** Points the director should know before signing (e.g. a second specimen with results). */
  notes: z.array(z.string()),
  submittedAt: z.string().nullable(),
  submittedByName: z.string().nullable(),
});
export type ReviewCase = z.infer<typeof reviewCaseSchema>;

export const signResultSchema = z.object({ report: reportDetailSchema, caseState: caseStateSchema, caseVersion: z.number().int() });
export type SignResult = z.infer<typeof signResultSchema>;

/* ---------------------------------------------------------------- mail */

export const outboxMessageSchema = z.object({
  id: z.number().int(),
  messageId: z.string().nullable(),
  from: z.string().nullable(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.string(),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

/** A notice's place in the outbox: waiting (first try or a retry), being handed over, sent, or given up. */
export const noticeStatusSchema = z.enum(['pending', 'sending', 'sent', 'failed']);
export type NoticeStatus = z.infer<typeof noticeStatusSchema>;

/** One clinician notice in the durable outbox (docs/notices.md). */
export const mailDeliverySchema = z.object({
  id: z.number().int(),
  kind: z.string(),
  reportId: z.number().int().nullable(),
  accession: z.string().nullable(),
  recipient: z.string(),
  subject: z.string(),
  status: noticeStatusSchema,
  /** Tries made so far (a try cut short by a stop of the server counts). */
  attempts: z.number().int(),
  maxAttempts: z.number().int(),
  /** Why the last try failed, in words for the administrator. */
  lastError: z.string().nullable(),
  messageId: z.string().nullable(),
  queuedAt: z.string(),
  lastAttemptAt: z.string().nullable(),
  /** When a waiting notice is due next. */
  nextAttemptAt: z.string().nullable(),
  sentAt: z.string().nullable(),
  /** Whether an administrator may ask for it to be sent again (failed, with its text kept). */
  canRetry: z.boolean(),
});
export type MailDelivery = z.infer<typeof mailDeliverySchema>;

/** GET /api/outbox: what the local SMTP stand-in received, and every notice in the outbox with its state. */
export const outboxSchema = z.object({
  messages: z.array(outboxMessageSchema),
  deliveries: z.array(mailDeliverySchema),
  /** True when a local SMTP stand-in receives the mail (development and tests), false with a real server. */
  localServer: z.boolean(),
  /** The waits between tries, in seconds (the first try is immediate). */
  retryDelaysSeconds: z.array(z.number().int()),
});
export type Outbox = z.infer<typeof outboxSchema>;
