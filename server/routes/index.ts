import { Router } from 'express';
import type { Config } from '../config.ts';
import { auditRouter } from './audit.routes.ts';
import { authRouter } from './auth.routes.ts';
import { calcRouter } from './calc.routes.ts';
import { certificatesRouter } from './certificates.routes.ts';
import { healthRouter } from './health.routes.ts';
import { inventoryRouter } from './inventory.routes.ts';
import { lineageRouter } from './lineage.routes.ts';
import { gravimetricRouter } from './gravimetric.routes.ts';
import { mixRouter } from './mix.routes.ts';
import { preparationsRouter } from './preparations.routes.ts';
import { printingRouter } from './printing.routes.ts';
import { signaturesRouter } from './signatures.routes.ts';
import { traceRouter } from './trace.routes.ts';
import { outboxRouter } from './outbox.routes.ts';
import { settingsRouter } from './settings.routes.ts';
import { usersRouter } from './users.routes.ts';
import { sessionsRouter } from './sessions.routes.ts';
import { expiryRouter } from './expiry.routes.ts';
import { worklistsRouter } from './worklists.routes.ts';
import { volumeChecksRouter } from './volume-checks.routes.ts';

/** Everything under /api. Each route states its role check (requireAuth / requireRole). */
export function apiRouter(config: Config): Router {
  const router = Router();
  router.use(healthRouter());
  router.use(authRouter(config));
  router.use(usersRouter());
  router.use(sessionsRouter());
  router.use(settingsRouter());
  router.use(calcRouter());
  router.use(volumeChecksRouter(config));
  router.use(inventoryRouter());
  router.use(certificatesRouter(config));
  router.use(preparationsRouter());
  router.use(lineageRouter());
  router.use(gravimetricRouter());
  router.use(mixRouter());
  router.use(printingRouter());
  router.use(signaturesRouter(config));
  router.use(expiryRouter(config));
  router.use(outboxRouter());
  router.use(traceRouter(config));
  router.use(auditRouter());
  router.use(worklistsRouter());
  return router;
}
