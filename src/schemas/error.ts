import { z } from 'zod';

export const errorCodes = [
  'VALIDATION_FAILED',
  'MALFORMED_JSON',
  'UNAUTHENTICATED',
  'BAD_CREDENTIALS',
  'ACCOUNT_LOCKED',
  'FORBIDDEN',
  /** Separation of duties: the director who drafted a version cannot approve it (unless self-approval is allowed). */
  'SECOND_DIRECTOR_REQUIRED',
  'PASSWORD_CHANGE_REQUIRED',
  'ORIGIN_REFUSED',
  'NOT_FOUND',
  'CONFLICT',
  'STALE_VERSION',
  'INVALID_STATE',
  /** A result to be submitted comes from an analytical run whose quality control was rejected or not evaluated. */
  'QC_NOT_ACCEPTED',
  'TOO_LARGE',
  'TOO_MANY_REQUESTS',
  'FILE_REJECTED',
  'INTERNAL',
] as const;
export const errorCodeSchema = z.enum(errorCodes);
export type ErrorCode = z.infer<typeof errorCodeSchema>;

/** A problem located in an uploaded file: 1-based row, column header or number. */
export const fileIssueSchema = z.object({
  row: z.number().int().nullable(),
  column: z.string().nullable(),
  message: z.string(),
});
export type FileIssue = z.infer<typeof fileIssueSchema>;

export const errorBodySchema = z.object({
  error: z.object({
    code: errorCodeSchema,
    message: z.string(),
    /** One message per invalid field, keyed by the field's dotted path. */
    fields: z.record(z.string(), z.string()).optional(),
    issues: z.array(fileIssueSchema).optional(),
  }),
});
export type ErrorBody = z.infer<typeof errorBodySchema>;
