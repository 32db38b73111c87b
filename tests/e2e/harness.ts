/**
 * Browser-test harness: starts the real server as `npm start` runs it (`node scripts/start.mjs`: the compiled
 * server, rebuilt when a source changed) on a free port with a fresh
 * SQLite file, and drives Debian's Chromium with playwright-core (STACK.md §6 launch arguments).
 * Every page is watched: a console error or a request to any host other than localhost fails the test.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const ARTIFACTS = join(ROOT, 'artifacts');

export type RunningServer = { baseUrl: string; stop: () => Promise<void>; log: () => string; /** the server's SQLite file (for tamper tests through a second connection) */ dbPath: string };

function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const srv = createServer();
    srv.once('error', rej);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => res(port));
    });
  });
}

/** opts.workingStandards: seed the demo lab's working standards too (seed/demo-working-standards.ts); by default stocks only */
export async function startServer(opts: { workingStandards?: boolean } = {}): Promise<RunningServer> {
  const dir = mkdtempSync(join(tmpdir(), 'tarebook-e2e-'));
  const port = await freePort();
  const env: NodeJS.ProcessEnv = { ...process.env, PORT: String(port), TAREBOOK_DB: join(dir, 'e2e.sqlite'), DEMO_WORKING_STANDARDS: opts.workingStandards ? '1' : '0' };
  delete env.NODE_ENV; // vitest sets "test"; the server must run as a plain `npm start` would
  delete env.VITE_MIDDLEWARE;

  // detached: the child leads its own process group, so stop() ends it and anything it started together.
  const child: ChildProcess = spawn(process.execPath, ['scripts/start.mjs'], { cwd: ROOT, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
  let output = '';
  child.stdout?.on('data', (d: Buffer) => (output += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (output += d.toString()));

  await new Promise<void>((res, rej) => {
    const timer = setTimeout(() => rej(new Error(`server did not start within 90 s:\n${output}`)), 90_000);
    const check = () => {
      if (/Tarebook listening on/.test(output)) {
        clearTimeout(timer);
        res();
      }
    };
    child.stdout?.on('data', check);
    child.once('exit', (code) => {
      clearTimeout(timer);
      rej(new Error(`server exited with ${code} before listening:\n${output}`));
    });
  });

  const stop = async () => {
    if (child.exitCode === null && child.pid) {
      const exited = new Promise<void>((res) => child.once('exit', () => res()));
      try {
        process.kill(-child.pid, 'SIGTERM');
      } catch {
        /* already gone */
      }
      await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
      if (child.exitCode === null) {
        try {
          process.kill(-child.pid, 'SIGKILL');
        } catch {
          /* already gone */
        }
      }
    }
    rmSync(dir, { recursive: true, force: true });
  };
  return { baseUrl: `http://127.0.0.1:${port}`, stop, log: () => output, dbPath: join(dir, 'e2e.sqlite') };
}

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

export type WatchedPage = { context: BrowserContext; page: Page; problems: string[] };

const LOCAL_HOSTS = new Set(['127.0.0.1', 'localhost']);

/**
 * A fresh context (no cookies) whose page records console errors, uncaught exceptions and
 * non-local requests. The one expected console error is the browser's own note about the
 * signed-out session probe (GET /api/auth/me → 401), which is how the app learns nobody is signed in.
 */
export async function openPage(browser: Browser, viewport = { width: 1280, height: 800 }): Promise<WatchedPage> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() !== 'error') return;
    const url = msg.location().url ?? '';
    if (/\/api\/auth\/me$/.test(url) && /401/.test(msg.text())) return;
    problems.push(`console error: ${msg.text()} (${url})`);
  });
  page.on('pageerror', (err) => problems.push(`page error: ${err.message}`));
  page.on('request', (req) => {
    const u = new URL(req.url());
    if (u.protocol === 'data:' || u.protocol === 'blob:') return;
    if (!LOCAL_HOSTS.has(u.hostname)) problems.push(`request to another host: ${req.url()}`);
  });
  return { context, page, problems };
}

export async function signIn(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.fill('input[name="email"]', email);
  await page.fill('input[name="password"]', password);
  await page.click('[data-testid="sign-in-submit"]');
  await page.waitForSelector('[data-testid="home-role"]');
}

export async function screenshot(page: Page, name: string, fullPage = true): Promise<void> {
  mkdirSync(ARTIFACTS, { recursive: true });
  await page.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage });
}
