import { z } from 'zod';
import { plainText, roleSchema } from './common';

export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters')
  .max(200, 'Use at most 200 characters');

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
});
export type User = z.infer<typeof userSchema>;

export const userAccountSchema = userSchema.extend({
  title: z.string().nullable(),
  active: z.boolean(),
  lockedUntil: z.string().nullable(),
  version: z.number().int(),
  createdAt: z.string(),
});
export type UserAccount = z.infer<typeof userAccountSchema>;

export const loginInputSchema = z
  .object({
    email: z.string().trim().min(1, 'Enter your e-mail address').max(254),
    password: z.string().min(1, 'Enter your password').max(200),
  })
  .strict();
export type LoginInput = z.infer<typeof loginInputSchema>;

export const createUserInputSchema = z
  .object({
    email: z.email('Enter a valid e-mail address').max(254),
    name: z.string().trim().min(1, 'Name is required').max(120).superRefine(plainText('Name')),
    title: z.string().trim().max(120).superRefine(plainText('Title')).optional(),
    role: roleSchema,
    password: passwordSchema,
  })
  .strict();
export type CreateUserInput = z.infer<typeof createUserInputSchema>;

/** Changes to an account: any of name, title, role, active, with the version the editor saw. */
export const updateUserInputSchema = createUserInputSchema
  .pick({ name: true, title: true, role: true })
  .partial()
  .extend({ active: z.boolean().optional(), version: z.number().int().min(0) })
  .strict();
export type UpdateUserInput = z.infer<typeof updateUserInputSchema>;

export const resetPasswordInputSchema = createUserInputSchema.pick({ password: true }).strict();
export type ResetPasswordInput = z.infer<typeof resetPasswordInputSchema>;

export const meResponseSchema = z.object({ user: userSchema });
