/**
 * Sign-in use cases. Lockout after N consecutive failures (REQUIREMENTS PW-03); only an administrator
 * unlocks. Unknown emails and wrong passwords get the same answer and take the same time.
 */
import type { LoginInput, SessionUser } from '../../shared/schemas/auth.ts';
import { User } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';
import { burnComparison, verifyPassword } from './passwords.ts';
import { toSessionUser } from './user-dto.ts';

export const WRONG_CREDENTIALS = 'Email or password is not correct';
export const LOCKED_MESSAGE =
  'This account is locked after repeated failed sign-ins; ask an administrator to unlock it';
export const INACTIVE_MESSAGE = 'This account has been deactivated; ask an administrator if you need access';

const locked = () => new AppError('account_locked', 423, LOCKED_MESSAGE);

export async function signIn(input: LoginInput, opts: { lockoutThreshold: number }): Promise<SessionUser> {
  const email = input.email.trim().toLowerCase();
  const user = await User.findOne({ where: { email } });
  if (!user) {
    await burnComparison(input.password);
    throw new AppError('invalid_credentials', 401, WRONG_CREDENTIALS);
  }
  if (user.lockedAt) throw locked();

  const ok = await verifyPassword(input.password, user.passwordHash);
  if (!ok) {
    user.failedLoginCount = (user.failedLoginCount ?? 0) + 1;
    const nowLocked = user.failedLoginCount >= opts.lockoutThreshold;
    if (nowLocked) user.lockedAt = new Date().toISOString();
    await user.save();
    if (nowLocked) throw locked();
    throw new AppError('invalid_credentials', 401, WRONG_CREDENTIALS);
  }
  if (!user.active) throw new AppError('account_inactive', 403, INACTIVE_MESSAGE);

  user.failedLoginCount = 0;
  user.lastLoginAt = new Date().toISOString();
  await user.save();
  return toSessionUser(user);
}

/** The user behind a session, or null when the account is gone or deactivated. */
export async function findSessionUser(userId: number): Promise<SessionUser | null> {
  const user = await User.findByPk(userId);
  if (!user || !user.active) return null;
  return toSessionUser(user);
}
