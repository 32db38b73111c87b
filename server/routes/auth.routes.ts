import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { loginInputSchema } from '../../shared/schemas/auth.ts';
import type { Config } from '../config.ts';
import { toApiError } from '../errors/to-api-error.ts';
import { AppError } from '../errors/app-error.ts';
import { LoginThrottle } from '../middleware/login-throttle.ts';
import { requireAuth } from '../middleware/session.ts';
import { signIn, signOut } from '../services/auth.service.ts';

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
    let user;
    try {
      user = await signIn(input, { lockoutThreshold: config.lockoutThreshold });
    } catch (err) {
      if (err instanceof AppError && (err.status === 401 || err.status === 423)) throttle.failed(input.email);
      throw err;
    }
    throttle.succeeded(input.email);
    req.session.userId = user.id;
    req.session.signedInAt = new Date().toISOString();
    await req.session.save();
    res.json({ user });
  });

  router.post('/auth/logout', async (req, res) => {
    await signOut(req.session.userId);
    req.session.destroy();
    res.status(204).end();
  });

  router.get('/auth/me', requireAuth, (req, res) => {
    res.json({ user: req.user });
  });

  return router;
}
