/**
 * Server-side sessions (table `sessions`, migration 0016; 21 CFR 11.10(d), 11.300; EU GMP Annex 11 §12).
 *
 * The cookie carries only a random session id (sealed by iron-session). Each authenticated request reads the
 * session and its user in one query by primary key (findLiveSession); last_seen_at is written at most once a
 * minute. A session ends:
 *   - when its user signs out (this session) or signs out everywhere (all of them);
 *   - for every session of the user at once, in the transaction of the change: password changed by the user
 *     (the current one is replaced by a fresh one), password reset by an administrator, lock, deactivation;
 *   - when an administrator ends it;
 *   - after the lab's idle timeout (settings.sessionIdleMinutes, default 30 min) since last_seen_at, or
 *     SESSION_ABSOLUTE_HOURS after sign-in, whichever comes first (found at the next request).
 * Ended rows are kept, with ended_at and ended_reason.
 */
import { randomBytes } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import { DEFAULT_SESSION_IDLE_MINUTES } from '../../shared/schemas/settings.ts';
import type { ActiveSession, SessionEndReason } from '../../shared/schemas/auth.ts';
import type { Role } from '../../shared/schemas/roles.ts';
import { Setting, User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';

/** Hard limit on one session, whatever the activity: a working day plus margin. */
export const SESSION_ABSOLUTE_HOURS = 12;
export const SESSION_ABSOLUTE_MS = SESSION_ABSOLUTE_HOURS * 60 * 60 * 1000;
/** last_seen_at is written at most this often (so the idle timeout is exact to within a minute). */
export const TOUCH_INTERVAL_MS = 60 * 1000;

const db = () => User.sequelize!;

/** 128 random bits, URL-safe; the primary key of `sessions`. */
export function newSessionId(): string {
  return randomBytes(16).toString('base64url');
}

// ------------------------------------------------------------------ idle timeout (a lab setting, cached)

let idleCache: { ms: number; readAt: number } | null = null;

/** The lab's idle timeout in ms; read from settings at most once a minute (not on every request). */
export async function idleTimeoutMs(now = Date.now()): Promise<number> {
  if (idleCache && now - idleCache.readAt < TOUCH_INTERVAL_MS) return idleCache.ms;
  const row = await Setting.findByPk('sessionIdleMinutes');
  const minutes = typeof row?.value === 'number' && Number.isInteger(row.value) && row.value > 0 ? row.value : DEFAULT_SESSION_IDLE_MINUTES;
  idleCache = { ms: minutes * 60 * 1000, readAt: now };
  return idleCache.ms;
}

/** Called when the settings change, so a new idle timeout applies at once. */
export function forgetIdleTimeout(): void {
  idleCache = null;
}

// ------------------------------------------------------------------ create, look up, touch

export async function createSession(
  userId: number,
  client: { ip?: string | null; userAgent?: string | null },
  transaction: Transaction,
  now = new Date(),
): Promise<string> {
  const id = newSessionId();
  const at = now.toISOString();
  await db().query(
    'INSERT INTO sessions (id, user_id, created_at, last_seen_at, ip, user_agent) VALUES (:id, :userId, :at, :at, :ip, :ua)',
    {
      replacements: { id, userId, at, ip: client.ip?.slice(0, 64) ?? null, ua: client.userAgent?.slice(0, 300) ?? null },
      transaction,
    },
  );
  return id;
}

export interface LiveSession {
  id: string;
  userId: number;
  createdAt: string;
  lastSeenAt: string;
  endedAt: string | null;
  endedReason: string | null;
  user: {
    id: number;
    email: string;
    fullName: string;
    initials: string;
    role: Role;
    active: boolean;
    locked: boolean;
    mustChangePassword: boolean;
  };
}

interface Row {
  id: string;
  user_id: number;
  created_at: string;
  last_seen_at: string;
  ended_at: string | null;
  ended_reason: string | null;
  email: string;
  full_name: string;
  initials: string;
  role: Role;
  active: number;
  locked_at: string | null;
  must_change_password: number;
}

/** The session and its user: one query, by primary key. Null when there is no such session. */
export async function findSession(id: string): Promise<LiveSession | null> {
  const [row] = await db().query<Row>(
    `SELECT s.id, s.user_id, s.created_at, s.last_seen_at, s.ended_at, s.ended_reason,
            u.email, u.full_name, u.initials, u.role, u.active, u.locked_at, u.must_change_password
     FROM sessions s JOIN users u ON u.id = s.user_id WHERE s.id = :id`,
    { type: QueryTypes.SELECT, replacements: { id } },
  );
  if (!row) return null;
  return {
    id: row.id,
    userId: Number(row.user_id),
    createdAt: row.created_at,
    lastSeenAt: row.last_seen_at,
    endedAt: row.ended_at,
    endedReason: row.ended_reason,
    user: {
      id: Number(row.user_id),
      email: row.email,
      fullName: row.full_name,
      initials: row.initials,
      role: row.role,
      active: Boolean(row.active),
      locked: row.locked_at !== null,
      mustChangePassword: Boolean(row.must_change_password),
    },
  };
}

/** Why a session that has not been ended yet must end now, or null while it is live. */
export function lapse(s: Pick<LiveSession, 'createdAt' | 'lastSeenAt' | 'user'>, idleMs: number, now: number): SessionEndReason | null {
  if (!s.user.active) return 'deactivated';
  if (s.user.locked) return 'locked';
  if (now - Date.parse(s.createdAt) >= SESSION_ABSOLUTE_MS) return 'expired';
  if (now - Date.parse(s.lastSeenAt) >= idleMs) return 'idle';
  return null;
}

/** Writes last_seen_at when it is more than a minute old. Not audited (bookkeeping, not a record). */
export async function touchSession(s: Pick<LiveSession, 'id' | 'lastSeenAt'>, now: number): Promise<void> {
  if (now - Date.parse(s.lastSeenAt) < TOUCH_INTERVAL_MS) return;
  await db().query('UPDATE sessions SET last_seen_at = :at WHERE id = :id AND ended_at IS NULL', {
    replacements: { at: new Date(now).toISOString(), id: s.id },
  });
}

// ------------------------------------------------------------------ ending sessions

/** Ends one session (no-op if it has ended). Returns whether it was open. */
export async function endSession(id: string, reason: SessionEndReason, transaction: Transaction, now = new Date()): Promise<boolean> {
  const [, changed] = await db().query('UPDATE sessions SET ended_at = :at, ended_reason = :reason WHERE id = :id AND ended_at IS NULL', {
    type: QueryTypes.UPDATE,
    replacements: { at: now.toISOString(), reason, id },
    transaction,
  });
  return Number(changed) > 0;
}

/** Ends every open session of a user (optionally all but one). Returns how many ended. */
export async function endUserSessions(
  userId: number,
  reason: SessionEndReason,
  transaction: Transaction,
  opts: { except?: string | null; now?: Date } = {},
): Promise<number> {
  // QueryTypes.UPDATE: the sqlite dialect then resolves to [undefined, number of rows changed]
  const [, changed] = await db().query(
    `UPDATE sessions SET ended_at = :at, ended_reason = :reason
     WHERE user_id = :userId AND ended_at IS NULL ${opts.except ? 'AND id <> :except' : ''}`,
    {
      type: QueryTypes.UPDATE,
      replacements: { at: (opts.now ?? new Date()).toISOString(), reason, userId, except: opts.except ?? null },
      transaction,
    },
  );
  return Number(changed);
}

/** Ends a session found idle, expired, locked or deactivated at a request, with its audit entry. */
export async function endLapsedSession(s: LiveSession, reason: SessionEndReason): Promise<void> {
  await writeTransaction(async (transaction) => {
    if (!(await endSession(s.id, reason, transaction))) return;
    await recordAudit(
      {
        actor: { id: s.user.id, fullName: s.user.fullName },
        action: 'session_ended',
        entity: 'session',
        entityId: s.id,
        reason: END_REASON_TEXT[reason],
        sessionId: s.id,
      },
      transaction,
    );
  });
}

export const END_REASON_TEXT: Record<SessionEndReason, string> = {
  sign_out: 'Signed out',
  sign_out_everywhere: 'Signed out everywhere',
  password_changed: 'The password was changed',
  password_reset: 'An administrator set a new password',
  locked: 'The account was locked',
  deactivated: 'The account was deactivated',
  idle: 'No activity for longer than the idle timeout',
  expired: `Older than the ${SESSION_ABSOLUTE_HOURS} h limit`,
  ended_by_admin: 'Ended by an administrator',
};

/** The message a refused cookie gets (401 unauthenticated). */
export function endedMessage(reason: string | null): string {
  switch (reason) {
    case 'idle':
      return 'You were signed out after a period without activity; sign in again';
    case 'expired':
      return `Sessions last at most ${SESSION_ABSOLUTE_HOURS} hours; sign in again`;
    case 'password_changed':
    case 'password_reset':
      return 'The password of this account was changed, which signed it out everywhere; sign in again';
    case 'locked':
      return 'This account is locked; ask an administrator to unlock it';
    case 'deactivated':
      return 'This account has been deactivated; ask an administrator if you need access';
    case 'ended_by_admin':
      return 'An administrator ended this session; sign in again';
    default:
      return 'Your session has ended; sign in again';
  }
}

// ------------------------------------------------------------------ sign out, list, end by admin

type Actor = { id: number; fullName: string };

export async function signOutEverywhere(actor: Actor, currentId: string | null): Promise<number> {
  return writeTransaction(async (transaction) => {
    const ended = await endUserSessions(actor.id, 'sign_out_everywhere', transaction);
    await recordAudit(
      {
        actor,
        action: 'sign_out_everywhere',
        entity: 'session',
        entityId: actor.id,
        changes: [{ field: 'sessionsEnded', oldValue: null, newValue: ended }],
        sessionId: currentId,
      },
      transaction,
    );
    return ended;
  });
}

/** Sessions not ended and within both limits, newest activity first (QA and admin). */
export async function listActiveSessions(now = Date.now()): Promise<ActiveSession[]> {
  const idleMs = await idleTimeoutMs(now);
  const rows = await db().query<{
    id: string;
    user_id: number;
    full_name: string;
    initials: string;
    email: string;
    role: Role;
    created_at: string;
    last_seen_at: string;
    ip: string | null;
    user_agent: string | null;
  }>(
    `SELECT s.id, s.user_id, u.full_name, u.initials, u.email, u.role, s.created_at, s.last_seen_at, s.ip, s.user_agent
     FROM sessions s JOIN users u ON u.id = s.user_id
     WHERE s.ended_at IS NULL AND s.last_seen_at > :idleCut AND s.created_at > :absCut
       AND u.active = 1 AND u.locked_at IS NULL
     ORDER BY s.last_seen_at DESC, s.created_at DESC`,
    {
      type: QueryTypes.SELECT,
      replacements: { idleCut: new Date(now - idleMs).toISOString(), absCut: new Date(now - SESSION_ABSOLUTE_MS).toISOString() },
    },
  );
  return rows.map((r) => ({
    id: r.id,
    userId: Number(r.user_id),
    fullName: r.full_name,
    initials: r.initials,
    email: r.email,
    role: r.role,
    createdAt: r.created_at,
    lastSeenAt: r.last_seen_at,
    idleExpiresAt: new Date(Date.parse(r.last_seen_at) + idleMs).toISOString(),
    expiresAt: new Date(Date.parse(r.created_at) + SESSION_ABSOLUTE_MS).toISOString(),
    ip: r.ip,
    userAgent: r.user_agent,
  }));
}

/** An administrator ends one session (any user's, including their own). */
export async function endSessionByAdmin(id: string, actor: Actor): Promise<void> {
  await writeTransaction(async (transaction) => {
    const [row] = await db().query<{ user_id: number; ended_at: string | null }>(
      'SELECT user_id, ended_at FROM sessions WHERE id = :id',
      { type: QueryTypes.SELECT, replacements: { id }, transaction },
    );
    if (!row) throw AppError.notFound('Session');
    if (row.ended_at) throw AppError.conflict('This session has already ended');
    await endSession(id, 'ended_by_admin', transaction);
    await recordAudit(
      {
        actor,
        action: 'session_ended',
        entity: 'session',
        entityId: id,
        changes: [{ field: 'userId', oldValue: null, newValue: Number(row.user_id) }],
        reason: END_REASON_TEXT.ended_by_admin,
      },
      transaction,
    );
  });
}
