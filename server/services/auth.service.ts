/**
 * Sign-in use cases. Lockout after N consecutive failures (REQUIREMENTS PW-03); only an administrator
 * unlocks. Unknown emails and wrong passwords get the same answer and take the same time.
 * Every sign-in, refused sign-in, lockout and sign-out is audited (REQUIREMENTS AT-08); a refused
 * sign-in's entry commits before the request fails.
 */
import type { LoginInput, SessionUser } from '../../shared/schemas/auth.ts';
import type { Transaction } from 'sequelize';
import { User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { burnComparison, verifyPassword } from './passwords.ts';
import { toSessionUser } from './user-dto.ts';

export const WRONG_CREDENTIALS = 'Email or password is not correct';
export const LOCKED_MESSAGE =
  'This account is locked after repeated failed sign-ins; ask an administrator to unlock it';
export const INACTIVE_MESSAGE = 'This account has been deactivated; ask an administrator if you need access';

const locked = () => new AppError('account_locked', 423, LOCKED_MESSAGE);

/** What the trail records about a refused sign-in: the email tried, never the password. */
async function recordFailure(
  email: string,
  reason: string,
  change?: (t: Transaction) => Promise<void>,
): Promise<void> {
  await writeTransaction(async (transaction) => {
    await change?.(transaction);
    await recordAudit({ actor: null, action: 'sign_in_failed', entity: 'session', entityId: email, reason }, transaction);
  });
}

export async function signIn(input: LoginInput, opts: { lockoutThreshold: number }): Promise<SessionUser> {
  const email = input.email.trim().toLowerCase();
  const user = await User.findOne({ where: { email } });
  if (!user) {
    await burnComparison(input.password);
    await recordFailure(email, 'Unknown email address');
    throw new AppError('invalid_credentials', 401, WRONG_CREDENTIALS);
  }
  if (user.lockedAt) {
    await recordFailure(email, 'Account is locked');
    throw locked();
  }

  const ok = await verifyPassword(input.password, user.passwordHash);
  if (!ok) {
    let nowLocked = false;
    // The failure count, the lockout and their audit entries commit together, before the request fails.
    await writeTransaction(async (transaction) => {
      await user.reload({ transaction });
      const before = user.failedLoginCount ?? 0;
      user.failedLoginCount = before + 1;
      nowLocked = !user.lockedAt && user.failedLoginCount >= opts.lockoutThreshold;
      if (nowLocked) user.lockedAt = new Date().toISOString();
      await user.save({ transaction });
      await recordAudit(
        {
          actor: null,
          action: 'sign_in_failed',
          entity: 'session',
          entityId: email,
          changes: [{ field: 'failedLoginCount', oldValue: before, newValue: user.failedLoginCount }],
          reason: 'Wrong password',
        },
        transaction,
      );
      if (nowLocked) {
        await recordAudit(
          {
            actor: null,
            action: 'account_locked',
            entity: 'user',
            entityId: user.id,
            changes: [{ field: 'locked', oldValue: false, newValue: true }],
            reason: `${user.failedLoginCount} consecutive failed sign-ins`,
          },
          transaction,
        );
      }
    });
    if (nowLocked || user.lockedAt) throw locked();
    throw new AppError('invalid_credentials', 401, WRONG_CREDENTIALS);
  }
  if (!user.active) {
    await recordFailure(email, 'Account is deactivated');
    throw new AppError('account_inactive', 403, INACTIVE_MESSAGE);
  }

  await writeTransaction(async (transaction) => {
    user.failedLoginCount = 0;
    user.lastLoginAt = new Date().toISOString();
    await user.save({ transaction });
    await recordAudit(
      { actor: { id: user.id, fullName: user.fullName }, action: 'sign_in', entity: 'session', entityId: user.id },
      transaction,
    );
  });
  return toSessionUser(user);
}

/** Records the end of a session; the route destroys the cookie. Unknown ids (account gone) are skipped. */
export async function signOut(userId: number | undefined): Promise<void> {
  if (!userId) return;
  const user = await User.findByPk(userId);
  if (!user) return;
  await writeTransaction((transaction) =>
    recordAudit(
      { actor: { id: user.id, fullName: user.fullName }, action: 'sign_out', entity: 'session', entityId: user.id },
      transaction,
    ),
  );
}

/** The user behind a session, or null when the account is gone or deactivated. */
export async function findSessionUser(userId: number): Promise<SessionUser | null> {
  // what the session needs, on every request: never the password hash
  const user = await User.findByPk(userId, { attributes: ['id', 'email', 'fullName', 'initials', 'role', 'active'] });
  if (!user || !user.active) return null;
  return toSessionUser(user);
}
