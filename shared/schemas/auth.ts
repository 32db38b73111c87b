import { z } from 'zod';
import { lineText } from './text.ts';
import { roleSchema } from './roles.ts';
import { newPasswordSchema } from './users.ts';

export const loginInputSchema = z.object({
  email: lineText({ error: 'Enter your email address' })
    .trim()
    .min(1, 'Enter your email address')
    .max(254, 'Email address is too long'),
  password: z
    .string({ error: 'Enter your password' })
    .min(1, 'Enter your password')
    .max(1024, 'Password is too long'),
});
export type LoginInput = z.infer<typeof loginInputSchema>;

/** The signed-in user as `/api/auth/me` and `/api/auth/login` return it. */
export const sessionUserSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  fullName: z.string(),
  initials: z.string(),
  role: roleSchema,
  /**
   * True when an administrator chose the current password (new account or reset): until the person chooses
   * their own (POST /api/auth/password), every other API answers 403 password_change_required.
   */
  mustChangePassword: z.boolean().optional(),
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

export const sessionUserResponseSchema = z.object({ user: sessionUserSchema });
export type SessionUserResponse = z.infer<typeof sessionUserResponseSchema>;

/** POST /api/auth/password: the person changes their own password (the current one proves who they are). */
export const changePasswordInputSchema = z.object({
  currentPassword: z
    .string({ error: 'Enter your current password' })
    .min(1, 'Enter your current password')
    .max(1024, 'Password is too long'),
  newPassword: newPasswordSchema,
});
export type ChangePasswordInput = z.infer<typeof changePasswordInputSchema>;

/** Code of the 403 every API answers while the account must choose its own password. */
export const PASSWORD_CHANGE_REQUIRED = 'password_change_required';

export const SESSION_END_REASONS = [
  'sign_out',
  'sign_out_everywhere',
  'password_changed',
  'password_reset',
  'locked',
  'deactivated',
  'idle',
  'expired',
  'ended_by_admin',
] as const;
export type SessionEndReason = (typeof SESSION_END_REASONS)[number];

/** A session that has not ended (GET /api/sessions, QA and admin). Times are UTC ISO strings. */
export const activeSessionSchema = z.object({
  id: z.string(),
  userId: z.number().int(),
  fullName: z.string(),
  initials: z.string(),
  email: z.string(),
  role: roleSchema,
  createdAt: z.string(),
  lastSeenAt: z.string(),
  /** when it ends without further activity (last seen + the lab's idle timeout, to within a minute) */
  idleExpiresAt: z.string(),
  /** when it ends whatever the activity (the absolute limit) */
  expiresAt: z.string(),
  ip: z.string().nullable(),
  userAgent: z.string().nullable(),
});
export type ActiveSession = z.infer<typeof activeSessionSchema>;
export const activeSessionListSchema = z.object({ items: z.array(activeSessionSchema) });
