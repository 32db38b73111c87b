/**
 * A fresh app per test file: temporary SQLite file (mkdtemp), migrations, optional demo seed.
 * The demo password is hashed once per process and reused.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Express } from 'express';
import type { Sequelize } from 'sequelize';
import request from 'supertest';
import { expect } from 'vitest';
import { createApp } from '../../../server/app.ts';
import { loadConfig, type Config } from '../../../server/config.ts';
import { migrateUp } from '../../../server/db/migrate.ts';
import { openDatabase } from '../../../server/db/sequelize.ts';
import { hashPassword } from '../../../server/services/passwords.ts';
import { DEMO_PASSWORD } from '../../../seed/demo-data.ts';
import { seedDemoLab } from '../../../seed/seed-demo-lab.ts';

export { DEMO_PASSWORD };

export const DEMO = {
  chemist: 'chemist@harbourside.example',
  chemist2: 'chemist2@harbourside.example',
  technician: 'technician@harbourside.example',
  qa: 'qa@harbourside.example',
  admin: 'admin@harbourside.example',
  inactive: 'former.chemist@harbourside.example',
} as const;

let demoHash: Promise<string> | undefined;
export const demoPasswordHash = () => (demoHash ??= hashPassword(DEMO_PASSWORD));

export interface TestApp {
  app: Express;
  sequelize: Sequelize;
  config: Config;
  dir: string;
  dbPath: string;
  close(): Promise<void>;
}

export async function makeTestApp(
  /** seed: true (default) the demo lab's users, inventory, stocks and volume checks; 'full' adds its working standards (seed/demo-working-standards.ts); false nothing */
  opts: { seed?: boolean | 'full'; env?: Record<string, string>; distDir?: string } = {},
): Promise<TestApp> {
  const dir = mkdtempSync(join(tmpdir(), 'tarebook-test-'));
  const dbPath = join(dir, 'test.sqlite');
  const config = loadConfig({
    NODE_ENV: 'test',
    TAREBOOK_DB: dbPath,
    SESSION_SECRET: 'test-secret-'.padEnd(48, 'x'),
    LOGIN_DELAY_MS: '0', // the per-account sign-in delay is tested in login-guards.test.ts
    ...opts.env,
  });
  const sequelize = await openDatabase(dbPath);
  await migrateUp(sequelize);
  if (opts.seed !== false) {
    await seedDemoLab(sequelize, { env: { NODE_ENV: 'test' }, passwordHash: await demoPasswordHash(), workingStandards: opts.seed === 'full' });
  }
  const app = createApp({ sequelize, config, distDir: opts.distDir ?? join(dir, 'no-dist') });
  return {
    app,
    sequelize,
    config,
    dir,
    dbPath,
    close: async () => {
      await sequelize.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Signs in and returns the session cookie header value. */
export async function sessionCookie(app: Express, email: string, password = DEMO_PASSWORD): Promise<string> {
  const res = await request(app).post('/api/auth/login').send({ email, password });
  expect(res.status, `login ${email}: ${JSON.stringify(res.body)}`).toBe(200);
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
  const cookie = cookies.find((c) => c.startsWith('tarebook_session='));
  expect(cookie).toBeDefined();
  return cookie!.split(';')[0]!;
}

/** A password an administrator sets for someone (new account, reset) is temporary until they choose their own. */
export const TEMPORARY_PASSWORD = 'set-by-the-admin-2026';

/**
 * Signs in with the temporary password an administrator set, chooses `chosen` (POST /api/auth/password) and
 * returns the new session cookie (the change ends every earlier session).
 */
export async function choosePassword(app: Express, email: string, chosen: string, temporary = TEMPORARY_PASSWORD): Promise<string> {
  const first = await sessionCookie(app, email, temporary);
  const res = await request(app).post('/api/auth/password').set('Cookie', first).send({ currentPassword: temporary, newPassword: chosen });
  expect(res.status, `change password ${email}: ${JSON.stringify(res.body)}`).toBe(200);
  const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('tarebook_session='));
  expect(cookie).toBeDefined();
  return cookie!.split(';')[0]!;
}

/** A supertest agent that keeps the session cookie. */
export async function signedInAgent(app: Express, email: string, password = DEMO_PASSWORD) {
  const agent = request.agent(app);
  const res = await agent.post('/api/auth/login').send({ email, password });
  expect(res.status, `login ${email}: ${JSON.stringify(res.body)}`).toBe(200);
  return agent;
}

export async function userIdByEmail(app: Express, adminCookie: string, email: string): Promise<number> {
  const res = await request(app).get('/api/users').set('Cookie', adminCookie);
  expect(res.status).toBe(200);
  const user = (res.body.items as { id: number; email: string }[]).find((u) => u.email === email);
  expect(user, email).toBeDefined();
  return user!.id;
}

/** Every error body has this shape (DEVELOPERS.md "Errors"). */
export function expectErrorBody(body: unknown, code?: string) {
  expect(body).toMatchObject({ error: { message: expect.any(String), code: code ?? expect.any(String) } });
  expect(JSON.stringify(body)).not.toMatch(/at .*\.ts:\d+/); // no stack traces
}
