/**
 * npm start: build the client if dist/ is missing, open and migrate the database, seed the demo lab
 * into an empty non-production database, then listen. With VITE_MIDDLEWARE=1 (npm run dev) Vite
 * serves the client from the same port (STACK P4).
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { dirname, join } from 'node:path';
import type { RequestHandler } from 'express';
import { createApp, DIST_DIR } from './app.ts';
import { ConfigError, loadConfig, type Config } from './config.ts';
import { migrateUp } from './db/migrate.ts';
import { configureAuditChain, ensureKeyedChain, writeAnchor } from './services/audit.service.ts';
import { initModels, User } from './db/models/index.ts';
import { openDatabase } from './db/sequelize.ts';
import type { FakeSmtpServer } from './mail/fake-smtp.ts';
import { createMailer, smtpTransport, type Mailer } from './mail/mailer.ts';
import { startScheduler } from './jobs/scheduler.ts';
import { logger } from './logger.ts';

/**
 * Builds the client in a child process: Vite's in-process build() sets NODE_ENV=production for the
 * whole process, which would switch the server to production mode (Secure cookies, no demo seed).
 */
function buildClient(): void {
  const root = dirname(DIST_DIR);
  const viteBin = join(root, 'node_modules', 'vite', 'bin', 'vite.js');
  const run = spawnSync(process.execPath, [viteBin, 'build'], { cwd: root, stdio: 'inherit' });
  if (run.status !== 0) throw new Error(`the client build failed (vite build exited with ${run.status ?? run.signal})`);
}

async function main(): Promise<void> {
  let config: Config;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      logger.fatal(`Tarebook cannot start: ${err.message}`);
      process.exit(1);
    }
    throw err;
  }

  if (!config.viteMiddleware && !existsSync(join(DIST_DIR, 'index.html'))) {
    if (config.production) {
      // a production install has no dev dependencies (vite): the client is built beforehand
      logger.fatal(`Tarebook cannot start: the built client is missing (${DIST_DIR}). Run \`npm run build\` where the dev dependencies are installed (the Dockerfile's build stage does) and ship dist/ and build/ with the app.`);
      process.exit(1);
    }
    logger.info('Building the client (dist/ is missing)…');
    buildClient();
  }

  const sequelize = await openDatabase(config.dbPath);
  const applied = await migrateUp(sequelize);
  if (applied.length) logger.info({ migrations: applied.map((m) => m.name) }, `Applied migrations: ${applied.map((m) => m.name).join(', ')}`);
  initModels(sequelize);
  configureAuditChain(sequelize, { key: config.auditChainKey, anchorFile: config.auditAnchorFile });

  if (!config.production && (await User.count()) === 0) {
    const { seedDemoLab } = await import('../seed/seed-demo-lab.ts');
    const result = await seedDemoLab(sequelize, { workingStandards: config.demoWorkingStandards });
    if (result.seeded) logger.info('Seeded the demo lab (Harbourside Water Laboratory); password for all demo accounts: bench-demo-2026');
  }

  await ensureKeyedChain(); // a database with unkeyed entries gets its switch entry now
  const anchor = await writeAnchor(); // the chain head, outside the database, at every start (and daily)
  if (anchor) logger.info(`Audit chain head #${anchor.id} anchored in ${config.auditAnchorFile}`);

  const httpServer: Server = createServer();
  let vite: { middlewares: RequestHandler; close(): Promise<void> } | undefined;
  if (config.viteMiddleware) {
    const { createServer: createViteServer } = await import('vite');
    vite = (await createViteServer({
      appType: 'spa',
      server: { middlewareMode: true, ws: { server: httpServer } },
    })) as unknown as typeof vite;
  }

  // e-mail: a local fake SMTP server (MAIL_MODE=fake, outside production) or the configured SMTP relay
  let fakeSmtp: FakeSmtpServer | undefined;
  let mailer: Mailer | undefined;
  if (config.mail.mode === 'fake') {
    // loaded only here: smtp-server and mailparser are dev dependencies, absent from a production install
    const { startFakeSmtpServer } = await import('./mail/fake-smtp.ts');
    fakeSmtp = await startFakeSmtpServer();
    logger.info(`Fake SMTP server on ${fakeSmtp.host}:${fakeSmtp.port} (messages in the admin Outbox)`);
  }
  if (config.mail.mode !== 'off') mailer = createMailer({ transport: smtpTransport(config, fakeSmtp), from: config.mail.from });

  const app = createApp({ sequelize, config, clientMiddleware: vite?.middlewares, mailer });
  httpServer.on('request', app);

  await new Promise<void>((resolve, reject) => {
    httpServer.once('error', reject);
    httpServer.listen(config.port, config.host, () => resolve());
  });
  const { port } = httpServer.address() as AddressInfo;
  logger.info({ port }, `Tarebook listening on http://localhost:${port}`);
  app.locals.publicUrl = config.publicUrl ?? `http://localhost:${port}`;
  mailer?.kick(); // deliver what was queued before a restart (and the demo seed's messages)
  const scheduler = await startScheduler({ publicUrl: () => app.locals.publicUrl as string, mailer }); // daily expiry digest, 06:00 lab time

  let closing = false;
  const shutdown = async (signal: string) => {
    if (closing) return;
    closing = true;
    app.locals.shuttingDown = true; // /api/health/ready answers 503 while connections drain
    logger.info(`${signal} received, shutting down…`);
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    httpServer.closeIdleConnections?.();
    await new Promise<void>((resolve) => httpServer.close(() => resolve()));
    await scheduler.stop();
    await vite?.close();
    mailer?.close();
    await fakeSmtp?.close();
    await sequelize.close();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

main().catch((err) => {
  logger.fatal({ err }, 'Tarebook failed to start');
  process.exit(1);
});
