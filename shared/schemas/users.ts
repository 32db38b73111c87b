import { z } from 'zod';
import { lineText } from './text.ts';
import { passwordProblem } from './password-rules.ts';
import { roleSchema } from './roles.ts';

export { ROLES, ROLE_LABELS, roleSchema, type Role } from './roles.ts';

export { PASSWORD_MIN_LENGTH, PASSWORD_MAX_BYTES, passwordProblem } from './password-rules.ts';

/**
 * A new password: the rules of shared/schemas/password-rules.ts (NIST SP 800-63B §5.1.1.2) that need no
 * account. The e-mail and name checks need the account: createUserInputSchema checks them on the object,
 * the server checks them on every password it stores.
 */
export const newPasswordSchema = z.string({ error: 'Enter a password' }).superRefine((value, ctx) => {
  const problem = passwordProblem(value);
  if (problem) ctx.addIssue({ code: 'custom', message: problem });
});
/** Kept for existing callers. */
export const passwordSchema = newPasswordSchema;

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
}).superRefine((input, ctx) => {
  // Only when the password passes the rules that need no account (those already have their issue).
  if (passwordProblem(input.password) !== null) return;
  const problem = passwordProblem(input.password, { email: input.email, fullName: input.fullName });
  if (problem) ctx.addIssue({ code: 'custom', path: ['password'], message: problem });
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
  /** the password was set by an administrator and the person has not chosen their own yet */
  mustChangePassword: z.boolean().optional(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type User = z.infer<typeof userSchema>;

export const userResponseSchema = z.object({ user: userSchema });
export const userListResponseSchema = z.object({ items: z.array(userSchema) });
