/**
 * Sessions: an iron-session 8 sealed cookie holding only the id of a row in `sessions` (migration 0016,
 * server/services/sessions.service.ts). Every authenticated request reads that row and its user in one query by
 * primary key, so logout, a password change or reset, a lock, a deactivation, an administrator's "end session",
 * the idle timeout and the absolute limit all refuse the old cookie at once (21 CFR 11.10(d); Annex 11 §12).
 * While the account must choose its own password, every route except "me", sign-out and the password change
 * answers 403 password_change_required.
 */
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { getIronSession, type IronSession } from 'iron-session';
import { PASSWORD_CHANGE_REQUIRED, type SessionUser } from '../../shared/schemas/auth.ts';
import type { Role } from '../../shared/schemas/roles.ts';
import type { Config } from '../config.ts';
import { AppError } from '../errors/app-error.ts';
import { runInRequestContext, setRequestSessionId } from '../services/request-context.ts';
import {
  endedMessage,
  endLapsedSession,
  findSession,
  idleTimeoutMs,
  lapse,
  SESSION_ABSOLUTE_HOURS,
  touchSession,
} from '../services/sessions.service.ts';

export interface SessionData {
  /** Primary key of the `sessions` row; nothing else is kept in the cookie. */
  sessionId?: string;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      session: IronSession<SessionData>;
      /** Set by requireAuth. */
      user?: SessionUser;
      /** The authenticated session's id; set by requireAuth. */
      sessionId?: string;
    }
  }
}

export const SESSION_COOKIE = 'tarebook_session';
/** The cookie lives as long as the server-side absolute limit (the row decides; the cookie only carries its id). */
const SESSION_TTL_SECONDS = SESSION_ABSOLUTE_HOURS * 60 * 60;

export function sessionMiddleware(config: Pick<Config, 'sessionSecret' | 'production'>): RequestHandler {
  return async (req, res, next) => {
    req.session = await getIronSession<SessionData>(req, res, {
      password: config.sessionSecret,
      cookieName: SESSION_COOKIE,
      ttl: SESSION_TTL_SECONDS,
      cookieOptions: { httpOnly: true, sameSite: 'lax', secure: config.production, path: '/' },
    });
    runInRequestContext(next);
  };
}

const ended = (message: string) => new AppError('unauthenticated', 401, message);

async function authenticate(req: Request, opts: { allowPasswordChange?: boolean } = {}): Promise<SessionUser> {
  if (req.user && req.sessionId) return checkPasswordGate(req.user, opts); // already checked on this request
  const sessionId = req.session?.sessionId;
  if (typeof sessionId !== 'string' || sessionId === '') throw new AppError('unauthenticated', 401, 'Sign in to continue');
  const found = await findSession(sessionId);
  if (!found || found.endedAt) {
    req.session.destroy();
    throw ended(endedMessage(found?.endedReason ?? null));
  }
  const now = Date.now();
  const reason = lapse(found, await idleTimeoutMs(now), now);
  if (reason) {
    await endLapsedSession(found, reason);
    req.session.destroy();
    throw ended(endedMessage(reason));
  }
  // Bookkeeping only (at most once a minute); a failure here must not refuse the request.
  touchSession(found, now).catch(() => undefined);
  const { id, email, fullName, initials, role, mustChangePassword } = found.user;
  const user: SessionUser = { id, email, fullName, initials, role, mustChangePassword };
  req.user = user;
  req.sessionId = found.id;
  setRequestSessionId(found.id);
  return checkPasswordGate(user, opts);
}

function checkPasswordGate(user: SessionUser, opts: { allowPasswordChange?: boolean }): SessionUser {
  if (user.mustChangePassword && !opts.allowPasswordChange) {
    throw new AppError(
      PASSWORD_CHANGE_REQUIRED,
      403,
      'Choose your own password first: the current one was set by an administrator (Change password)',
    );
  }
  return user;
}

/** 401 unless signed in with an active account; 403 while the password must be changed. Sets req.user. */
export const requireAuth: RequestHandler = async (req: Request, _res: Response, next: NextFunction) => {
  await authenticate(req);
  next();
};

/** Signed in, even when the password must still be changed ("me", sign-out, the password change). */
export const requireSession: RequestHandler = async (req: Request, _res: Response, next: NextFunction) => {
  await authenticate(req, { allowPasswordChange: true });
  next();
};

const ROLE_NAMES: Record<Role, string> = { chemist: 'chemist', technician: 'technician', qa: 'QA', admin: 'admin' };

/** Signed in and holding one of `roles`: 401 when signed out, 403 naming the role(s) needed. */
export function requireRole(...roles: Role[]): RequestHandler {
  const names = roles.map((r) => ROLE_NAMES[r]);
  const list = names.length > 1 ? `${names.slice(0, -1).join(', ')} or ${names.at(-1)}` : names[0];
  return async (req, _res, next) => {
    const user = await authenticate(req);
    if (!roles.includes(user.role)) {
      throw new AppError('forbidden', 403, `This needs the ${list} role`);
    }
    next();
  };
}
