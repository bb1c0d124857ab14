import { z } from 'zod';

export const labProfileSchema = z.object({
  name: z.string(),
  addressLines: z.array(z.string()),
  accreditationNumber: z.string(),
  phone: z.string().nullable(),
  timeZone: z.string(),
  version: z.number().int(),
});
export type LabProfile = z.infer<typeof labProfileSchema>;

export const updateLabProfileInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Laboratory name is required').max(160),
    addressLines: z
      .array(z.string().trim().max(160))
      .min(1, 'Give at least one address line')
      .max(6, 'Use at most six address lines'),
    accreditationNumber: z.string().trim().min(1, 'Accreditation number is required').max(80),
    phone: z.string().trim().max(40).nullable(),
    timeZone: z.string().trim().min(1).max(60),
    version: z.number().int().min(0),
  })
  .strict();
export type UpdateLabProfileInput = z.infer<typeof updateLabProfileInputSchema>;
