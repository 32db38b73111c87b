import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { Request } from 'express';
import { changePasswordInputSchema, loginInputSchema } from '../../shared/schemas/auth.ts';
import type { Config } from '../config.ts';
import { toApiError } from '../errors/to-api-error.ts';
import { AppError } from '../errors/app-error.ts';
import { LoginThrottle } from '../middleware/login-throttle.ts';
import { requireSession } from '../middleware/session.ts';
import { changeOwnPassword, signIn, signOut } from '../services/auth.service.ts';
import { signOutEverywhere } from '../services/sessions.service.ts';

const clientOf = (req: Request) => ({ ip: req.ip ?? null, userAgent: req.get('user-agent') ?? null });

export function authRouter(config: Config): Router {
  const router = Router();

  // Per IP; only failed attempts count, so a busy shared terminal is not blocked by good sign-ins.
  const loginLimiter = rateLimit({
    windowMs: config.loginRateWindowMs,
    limit: config.loginRateLimit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    handler: (_req, res) => {
      const { status, body } = toApiError(
        new AppError('rate_limited', 429, 'Too many sign-in attempts from this address; wait 15 minutes and try again'),
      );
      res.status(status).json(body);
    },
  });

  const throttle = new LoginThrottle(config.loginDelayMs);

  router.post('/auth/login', loginLimiter, async (req, res) => {
    const input = loginInputSchema.parse(req.body);
    const wait = throttle.waitMs(input.email);
    if (wait > 0) {
      const seconds = Math.ceil(wait / 1000);
      res.setHeader('Retry-After', String(seconds));
      throw new AppError('rate_limited', 429, `Too many failed sign-ins for this account; wait ${seconds} s and try again`, {
        fields: { email: `Wait ${seconds} s before the next attempt for this account` },
      });
    }
    let signedIn;
    try {
      signedIn = await signIn(input, { lockoutThreshold: config.lockoutThreshold, client: clientOf(req) });
    } catch (err) {
      if (err instanceof AppError && (err.status === 401 || err.status === 423)) throttle.failed(input.email);
      throw err;
    }
    throttle.succeeded(input.email);
    const { user, sessionId } = signedIn;
    req.session.sessionId = sessionId;
    await req.session.save();
    res.json({ user });
  });

  // Ends this session (the row, not only the cookie): a copy of the cookie is refused afterwards.
  router.post('/auth/logout', async (req, res) => {
    await signOut(req.session.sessionId);
    req.session.destroy();
    res.status(204).end();
  });

  // Ends every session of the signed-in account, this one included.
  router.post('/auth/logout-everywhere', requireSession, async (req, res) => {
    const ended = await signOutEverywhere(req.user!, req.sessionId ?? null);
    req.session.destroy();
    res.json({ sessionsEnded: ended });
  });

  router.get('/auth/me', requireSession, (req, res) => {
    res.json({ user: req.user });
  });

  // The person's own password (current + new). Also the way out of a password set by an administrator.
  router.post('/auth/password', requireSession, async (req, res) => {
    const input = changePasswordInputSchema.parse(req.body);
    const { user, sessionId } = await changeOwnPassword(req.user!, req.sessionId!, input, {
      lockoutThreshold: config.lockoutThreshold,
      client: clientOf(req),
    });
    req.session.sessionId = sessionId;
    await req.session.save();
    res.json({ user });
  });

  return router;
}
