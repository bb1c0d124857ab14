import { z } from 'zod';
import { plainText, roleSchema } from './common';

/**
 * The rule for every password a person or an administrator sets (OWASP ASVS 4.0, 2.1.1 and 2.1.2): at least
 * 12 characters, at most 128, any characters including spaces, no other composition rules.
 */
export const passwordSchema = z
  .string()
  .min(12, 'Use at least 12 characters')
  .max(128, 'Use at most 128 characters');

/** The same rule in plain words, shown beside every new-password field. */
export const passwordRule =
  'At least 12 characters. Spaces, punctuation and any letters are welcome; a short sentence is easy to remember.';

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
});
export type User = z.infer<typeof userSchema>;

/** The signed-in user as the session sees it: until a reset password is replaced, nothing else is allowed. */
export const sessionUserSchema = userSchema.extend({ mustChangePassword: z.boolean() });
export type SessionUser = z.infer<typeof sessionUserSchema>;

export const userAccountSchema = userSchema.extend({
  title: z.string().nullable(),
  active: z.boolean(),
  lockedUntil: z.string().nullable(),
  mustChangePassword: z.boolean(),
  passwordChangedAt: z.string().nullable(),
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

/** A person changes their own password: the current one again, and the new one. */
export const changePasswordInputSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password').max(200),
    newPassword: passwordSchema,
  })
  .strict()
  .refine((v) => v.newPassword !== v.currentPassword, {
    path: ['newPassword'],
    message: 'Choose a password different from the current one',
  });
export type ChangePasswordInput = z.infer<typeof changePasswordInputSchema>;

export const meResponseSchema = z.object({ user: sessionUserSchema });
