import { z } from 'zod';
import { lineText } from './text.ts';
import { roleSchema } from './roles.ts';

export { ROLES, ROLE_LABELS, roleSchema, type Role } from './roles.ts';

/** NIST SP 800-63B style: length only, no composition rules (REQUIREMENTS PW-02). */
export const PASSWORD_MIN_LENGTH = 10;

export const passwordSchema = z
  .string({ error: 'Enter a password' })
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(200, 'Use at most 200 characters');

const fullNameSchema = lineText({ error: 'Enter the full name' })
  .trim()
  .min(1, 'Enter the full name')
  .max(120, 'Use at most 120 characters');

const initialsSchema = z
  .string({ error: 'Enter the initials' })
  .trim()
  .regex(/^[A-Za-z]{1,5}$/, 'Use 1 to 5 letters, e.g. MT');

export const createUserInputSchema = z.object({
  email: z
    .string({ error: 'Enter an email address' })
    .trim()
    .toLowerCase()
    .pipe(z.email({ error: 'Enter a valid email address' }).max(254, 'Email address is too long')),
  fullName: fullNameSchema,
  initials: initialsSchema,
  role: roleSchema,
  password: passwordSchema,
});
export type CreateUserInput = z.input<typeof createUserInputSchema>;

export const updateUserInputSchema = z.object({
  fullName: fullNameSchema.optional(),
  initials: initialsSchema.optional(),
  role: roleSchema.optional(),
  active: z.boolean({ error: 'Must be true or false' }).optional(),
});
export type UpdateUserInput = z.infer<typeof updateUserInputSchema>;

export const setPasswordInputSchema = z.object({ password: passwordSchema });
export type SetPasswordInput = z.infer<typeof setPasswordInputSchema>;

/** A user as the admin screens see it. Times are UTC ISO strings. */
export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  fullName: z.string(),
  initials: z.string(),
  role: roleSchema,
  active: z.boolean(),
  locked: z.boolean(),
  lockedAt: z.string().nullable(),
  failedLoginCount: z.number().int(),
  lastLoginAt: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type User = z.infer<typeof userSchema>;

export const userResponseSchema = z.object({ user: userSchema });
export const userListResponseSchema = z.object({ items: z.array(userSchema) });
