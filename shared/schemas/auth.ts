import { z } from 'zod';
import { lineText } from './text.ts';
import { roleSchema } from './roles.ts';

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
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

export const sessionUserResponseSchema = z.object({ user: sessionUserSchema });
export type SessionUserResponse = z.infer<typeof sessionUserResponseSchema>;
