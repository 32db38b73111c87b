/**
 * createApp builds the Express app without listening (tests use it with supertest).
 * Order (STACK §6): helmet, request log (server/logger.ts), no-store + same-origin check, JSON body, input text rule, session, /api routers, JSON 404 for /api/*, client (static dist/
 * with SPA fallback, or a dev middleware such as Vite), then the error handler.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import express, { type Express, type RequestHandler } from 'express';
import helmet from 'helmet';
import type { Sequelize } from 'sequelize';
import type { Config } from './config.ts';
import { configureAuditChain } from './services/audit.service.ts';
import { initModels, modelsBoundTo } from './db/models/index.ts';
import { apiNotFound, errorMiddleware } from './errors/error-middleware.ts';
import { sessionMiddleware } from './middleware/session.ts';
import { inputGuard, noStore, sameOrigin } from './middleware/request-guards.ts';
import { apiRouter } from './routes/index.ts';
import { httpLogger } from './logger.ts';
import type { Mailer } from './mail/mailer.ts';

// <repo>/dist, from server/app.ts (tsx, vitest) or from build/server/app.js (compiled by scripts/build-server.mjs)
export const DIST_DIR = fileURLToPath(new URL(import.meta.url.endsWith('.js') ? '../../dist' : '../dist', import.meta.url));

export interface CreateAppOptions {
  sequelize?: Sequelize;
  /** Alias of `sequelize` (DEVELOPERS.md writes createApp({ db, config })). */
  db?: Sequelize;
  config: Config;
  /** Serves the client instead of dist/ (Vite middleware in dev). Mounted after /api. */
  clientMiddleware?: RequestHandler;
  /** Folder with the built client; default <repo>/dist. Served only when it holds index.html. */
  distDir?: string;
  /** Delivers queued e-mail after commit; without one, mail stays queued in mail_queue (tests, MAIL_MODE=off). */
  mailer?: Mailer;
}

export function createApp({ sequelize: given, db, config, clientMiddleware, distDir = DIST_DIR, mailer }: CreateAppOptions): Express {
  const sequelize = given ?? db;
  if (!sequelize) throw new Error('createApp needs { sequelize, config }');
  if (!modelsBoundTo(sequelize)) initModels(sequelize);
  configureAuditChain(sequelize, { key: config.auditChainKey, anchorFile: config.auditAnchorFile });

  const app = express();
  app.disable('x-powered-by');
  if (config.trustProxy > 0) app.set('trust proxy', config.trustProxy);
  app.locals.mailer = mailer;
  app.locals.lockoutThreshold = config.lockoutThreshold;

  // Vite's dev HTML needs inline scripts; keep the strict default CSP everywhere else (STACK P3).
  app.use(helmet(config.viteMiddleware ? { contentSecurityPolicy: false } : {}));

  const api = express.Router();
  api.use(httpLogger());
  api.use(noStore);
  api.use(sameOrigin(config));
  // strict: false lets a bare 42 or "text" through to zod, which answers "send a JSON object".
  api.use(express.json({ limit: '1mb', strict: false }));
  api.use(inputGuard);
  api.use(sessionMiddleware(config));
  api.use(apiRouter(config));
  api.use(apiNotFound);
  app.use('/api', api);

  if (clientMiddleware) {
    app.use(clientMiddleware);
  } else if (!config.viteMiddleware && existsSync(join(distDir, 'index.html'))) {
    const indexHtml = join(distDir, 'index.html');
    app.use(express.static(distDir, { index: false }));
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(indexHtml);
    });
  }

  app.use(errorMiddleware);
  return app;
}
