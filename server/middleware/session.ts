/**
 * Sessions: an iron-session 8 sealed cookie holding only the user id. The user row is re-read on every
 * authenticated request, so a deactivated account loses access at once (REQUIREMENTS PW-06).
 */
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { getIronSession, type IronSession } from 'iron-session';
import type { SessionUser } from '../../shared/schemas/auth.ts';
import type { Role } from '../../shared/schemas/roles.ts';
import type { Config } from '../config.ts';
import { AppError } from '../errors/app-error.ts';
import { findSessionUser } from '../services/auth.service.ts';

export interface SessionData {
  userId?: number;
  signedInAt?: string;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      session: IronSession<SessionData>;
      /** Set by requireAuth. */
      user?: SessionUser;
    }
  }
}

export const SESSION_COOKIE = 'tarebook_session';
/** Sessions end after 12 h even if the browser stays open (a working day plus margin). */
const SESSION_TTL_SECONDS = 12 * 60 * 60;

export function sessionMiddleware(config: Pick<Config, 'sessionSecret' | 'production'>): RequestHandler {
  return async (req, res, next) => {
    req.session = await getIronSession<SessionData>(req, res, {
      password: config.sessionSecret,
      cookieName: SESSION_COOKIE,
      ttl: SESSION_TTL_SECONDS,
      cookieOptions: { httpOnly: true, sameSite: 'lax', secure: config.production, path: '/' },
    });
    next();
  };
}

async function authenticate(req: Request): Promise<SessionUser> {
  const userId = req.session?.userId;
  if (!userId) throw new AppError('unauthenticated', 401, 'Sign in to continue');
  const user = await findSessionUser(userId);
  if (!user) {
    req.session.destroy();
    throw new AppError('unauthenticated', 401, 'Your session has ended; sign in again');
  }
  req.user = user;
  return user;
}

/** 401 unless signed in with an active account. Sets req.user. */
export const requireAuth: RequestHandler = async (req: Request, _res: Response, next: NextFunction) => {
  await authenticate(req);
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
