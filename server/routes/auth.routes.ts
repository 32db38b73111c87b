import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { loginInputSchema } from '../../shared/schemas/auth.ts';
import type { Config } from '../config.ts';
import { toApiError } from '../errors/to-api-error.ts';
import { AppError } from '../errors/app-error.ts';
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

  router.post('/auth/login', loginLimiter, async (req, res) => {
    const input = loginInputSchema.parse(req.body);
    const user = await signIn(input, { lockoutThreshold: config.lockoutThreshold });
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
