import { z } from 'zod';
import { ianaTimeZoneSchema, plainText } from './common';

export const labProfileSchema = z.object({
  name: z.string(),
  addressLines: z.array(z.string()),
  accreditationNumber: z.string(),
  phone: z.string().nullable(),
  /** The zone times are read and printed in: the stored one, or UTC when the stored one is not a real zone. */
  timeZone: z.string(),
  /** Set when the stored zone is not a real IANA zone and UTC is used instead; says what to fix. */
  timeZoneNotice: z.string().nullable(),
  /** A laboratory with a single director: a director may approve the interval and definition versions they drafted. */
  allowSelfApproval: z.boolean(),
  version: z.number().int(),
});
export type LabProfile = z.infer<typeof labProfileSchema>;

export const updateLabProfileInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Laboratory name is required').max(160).superRefine(plainText('Laboratory name')),
    addressLines: z
      .array(z.string().trim().max(160).superRefine(plainText('Address line')))
      .min(1, 'Give at least one address line')
      .max(6, 'Use at most six address lines'),
    accreditationNumber: z
      .string()
      .trim()
      .min(1, 'Accreditation number is required')
      .max(80)
      .superRefine(plainText('Accreditation number')),
    phone: z.string().trim().max(40).superRefine(plainText('Telephone')).nullable(),
    timeZone: ianaTimeZoneSchema,
    /** Read-only (GET answers it); accepted and ignored so a profile read can be sent back as it is. */
    timeZoneNotice: z.string().nullable().optional(),
    /** Left out: the stored setting is kept. */
    allowSelfApproval: z.boolean({ error: 'Tick or clear “single director”' }).optional(),
    version: z.number().int().min(0),
  })
  .strict();
export type UpdateLabProfileInput = z.infer<typeof updateLabProfileInputSchema>;
