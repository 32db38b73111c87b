/**
 * Sign-in use cases. Lockout after N consecutive failures (REQUIREMENTS PW-03); only an administrator
 * unlocks. Unknown emails and wrong passwords get the same answer and take the same time.
 * Every sign-in, refused sign-in, lockout and sign-out is audited (REQUIREMENTS AT-08); a refused
 * sign-in's entry commits before the request fails.
 */
import type { ChangePasswordInput, LoginInput, SessionUser } from '../../shared/schemas/auth.ts';
import { passwordProblem } from '../../shared/schemas/password-rules.ts';
import { QueryTypes, type Transaction } from 'sequelize';
import { User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { burnComparison, hashPassword, verifyPassword } from './passwords.ts';
import { createSession, endSession, endUserSessions } from './sessions.service.ts';
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

export interface SignInClient {
  ip?: string | null;
  userAgent?: string | null;
}

/** Checks the password and opens a session (a row in `sessions`); the route puts its id in the cookie. */
export async function signIn(
  input: LoginInput,
  opts: { lockoutThreshold: number; client?: SignInClient },
): Promise<{ user: SessionUser; sessionId: string }> {
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
        const ended = await endUserSessions(user.id, 'locked', transaction);
        await recordAudit(
          {
            actor: null,
            action: 'account_locked',
            entity: 'user',
            entityId: user.id,
            changes: [
              { field: 'locked', oldValue: false, newValue: true },
              ...(ended ? [{ field: 'sessionsEnded', oldValue: null, newValue: ended }] : []),
            ],
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

  const sessionId = await writeTransaction(async (transaction) => {
    user.failedLoginCount = 0;
    user.lastLoginAt = new Date().toISOString();
    await user.save({ transaction });
    const id = await createSession(user.id, opts.client ?? {}, transaction);
    await recordAudit(
      {
        actor: { id: user.id, fullName: user.fullName },
        action: 'sign_in',
        entity: 'session',
        entityId: user.id,
        ...(user.mustChangePassword ? { reason: 'Password set by an administrator: must be changed before anything else' } : {}),
        sessionId: id,
      },
      transaction,
    );
    return id;
  });
  return { user: toSessionUser(user), sessionId };
}

/** Ends this session and records it; the route destroys the cookie. An unknown or ended session is skipped. */
export async function signOut(sessionId: string | undefined): Promise<void> {
  if (!sessionId) return;
  await writeTransaction(async (transaction) => {
    const [row] = await User.sequelize!.query<{ user_id: number }>(
      'SELECT user_id FROM sessions WHERE id = :id AND ended_at IS NULL',
      { type: QueryTypes.SELECT, replacements: { id: sessionId }, transaction },
    );
    if (!row) return;
    const user = await User.findByPk(Number(row.user_id), { transaction });
    await endSession(sessionId, 'sign_out', transaction);
    await recordAudit(
      {
        actor: user ? { id: user.id, fullName: user.fullName } : null,
        action: 'sign_out',
        entity: 'session',
        entityId: Number(row.user_id),
        sessionId,
      },
      transaction,
    );
  });
}

/**
 * The signed-in person changes their own password (old + new). Every session of the account ends, this one
 * included, and a fresh session is returned for this browser, so a copied cookie stops working. A wrong
 * current password counts towards the lockout like a wrong sign-in (REQUIREMENTS PW-03).
 */
export async function changeOwnPassword(
  actor: { id: number },
  currentSessionId: string,
  input: ChangePasswordInput,
  opts: { lockoutThreshold: number; client?: SignInClient },
): Promise<{ user: SessionUser; sessionId: string }> {
  const user = await User.findByPk(actor.id);
  if (!user || !user.active) throw new AppError('unauthenticated', 401, 'Sign in to continue');
  if (user.lockedAt) throw locked();
  if (!(await verifyPassword(input.currentPassword, user.passwordHash))) {
    let nowLocked = false;
    await writeTransaction(async (transaction) => {
      await user.reload({ transaction });
      const before = user.failedLoginCount ?? 0;
      user.failedLoginCount = before + 1;
      nowLocked = !user.lockedAt && user.failedLoginCount >= opts.lockoutThreshold;
      if (nowLocked) user.lockedAt = new Date().toISOString();
      await user.save({ transaction });
      const who = { id: user.id, fullName: user.fullName };
      await recordAudit(
        {
          actor: who,
          action: 'password_change_failed',
          entity: 'user',
          entityId: user.id,
          changes: [{ field: 'failedLoginCount', oldValue: before, newValue: user.failedLoginCount }],
          reason: 'Wrong current password',
        },
        transaction,
      );
      if (nowLocked) {
        const ended = await endUserSessions(user.id, 'locked', transaction);
        await recordAudit(
          {
            actor: null,
            action: 'account_locked',
            entity: 'user',
            entityId: user.id,
            changes: [
              { field: 'locked', oldValue: false, newValue: true },
              { field: 'sessionsEnded', oldValue: null, newValue: ended },
            ],
            reason: `${user.failedLoginCount} consecutive failed passwords`,
          },
          transaction,
        );
      }
    });
    if (nowLocked) throw locked();
    throw new AppError('invalid_credentials', 400, 'The current password is not correct', {
      fields: { currentPassword: 'This is not your current password' },
    });
  }
  const problem = passwordProblem(input.newPassword, { email: user.email, fullName: user.fullName });
  if (problem) throw AppError.validation(problem, { newPassword: problem });
  if (await verifyPassword(input.newPassword, user.passwordHash)) {
    const message = 'Choose a password different from the current one';
    throw AppError.validation(message, { newPassword: message });
  }
  const passwordHash = await hashPassword(input.newPassword); // slow: outside the write lock
  const sessionId = await writeTransaction(async (transaction) => {
    await user.reload({ transaction });
    const wasTemporary = Boolean(user.mustChangePassword);
    user.passwordHash = passwordHash;
    user.mustChangePassword = false;
    user.failedLoginCount = 0;
    await user.save({ transaction });
    const ended = await endUserSessions(user.id, 'password_changed', transaction);
    const id = await createSession(user.id, opts.client ?? {}, transaction);
    await recordAudit(
      {
        actor: { id: user.id, fullName: user.fullName },
        action: 'password_changed',
        entity: 'user',
        entityId: user.id,
        // The trail says that the password changed, never what it was or is.
        changes: [
          { field: 'password', oldValue: null, newValue: 'password changed by its owner' },
          ...(wasTemporary ? [{ field: 'mustChangePassword', oldValue: true, newValue: false }] : []),
          { field: 'sessionsEnded', oldValue: null, newValue: ended },
        ],
        sessionId: currentSessionId,
      },
      transaction,
    );
    return id;
  });
  return { user: toSessionUser(user), sessionId };
}
