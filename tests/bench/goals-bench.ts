/**
 * The goals of issue 11, in one bounded run (`npm run bench`, or `npm run bench -- --quick`):
 *
 * 1. start-up: the real server as `npm start` runs it, on an existing database, spawn → first 200 on /api/health;
 * 2. HTTP: the real server and a bare Express JSON route side by side on loopback, driven in turn by autocannon
 *    (50 connections, a fixed duration per target, 3 alternating rounds); ratio = real req/s ÷ bare req/s;
 * 3. PDFs in this process: prep sheet and 100 labels against a minimal one-page react-pdf render (warm), and
 *    the cold first render;
 * 4. the calculation core: a plan with its budget (calculatePreparation), median time;
 * 5. scaling: list, detail, search, traces (standard, lot, balance) and the expiry job at 1k, 10k and 100k
 *    preparations, and the heap a lot trace takes.
 *
 * Every figure is printed beside its goal with PASS/FAIL and written to bench-results.json (the previous file is
 * kept as bench-results.prev.json so a change can be compared with the last run). Ratios, not absolute times: the
 * machine is shared. Loopback only; every phase stops by itself.
 * BENCH_SERVER_CMD (e.g. "npx tsx server/index.ts") runs another start command, for a baseline of older code.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import autocannon from 'autocannon';
import { QueryTypes, type Sequelize } from 'sequelize';
import request from 'supertest';
import type { Express } from 'express';
import { createApp } from '../../server/app.ts';
import { devChainKey, loadConfig } from '../../server/config.ts';
import { migrateUp } from '../../server/db/migrate.ts';
import { openDatabase } from '../../server/db/sequelize.ts';
import { renderMinimal } from '../../server/pdf/render.ts';
import { runExpiryDigest } from '../../server/services/expiry-digest.service.ts';
import { configureAuditChain } from '../../server/services/audit.service.ts';
import { hashPassword } from '../../server/services/passwords.ts';
import { calculatePreparation, preparationMonteCarloModel } from '../../shared/calc/preparation.ts';
import { runMonteCarlo } from '../../shared/calc/monte-carlo.ts';
import { runMonteCarloInWorker, stopMonteCarloWorker } from '../../server/services/monte-carlo.service.ts';
import { DEMO_PASSWORD } from '../../seed/demo-data.ts';
import { seedDemoLab } from '../../seed/seed-demo-lab.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const SECRET = 'bench-secret-'.padEnd(48, 'x');

interface Line {
  group: string;
  name: string;
  value: number;
  unit: string;
  goal: string;
  pass: boolean | null; // null = shown, no goal
  detail?: string;
}

const lines: Line[] = [];
function record(l: Line): void {
  lines.push(l);
  const v = l.unit === '%' ? `${l.value.toFixed(1)} %` : l.unit === '×' ? `${l.value.toFixed(2)}×` : `${l.value.toFixed(l.value < 10 ? 2 : 0)} ${l.unit}`;
  const verdict = l.pass === null ? '    ' : l.pass ? 'PASS' : 'FAIL';
  console.log(`${verdict}  ${`${l.group}: ${l.name}`.padEnd(58)} ${v.padStart(12)}   goal ${l.goal}${l.detail ? `   (${l.detail})` : ''}`);
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? (s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2) : NaN;
};

function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const srv = createServer();
    srv.once('error', rej);
    srv.listen(0, '127.0.0.1', () => {
      const a = srv.address();
      const port = typeof a === 'object' && a ? a.port : 0;
      srv.close(() => res(port));
    });
  });
}

// ------------------------------------------------------------------ filling the database fast

/**
 * Clones the demo's verified stock (with its weighings and make-ups) into `target` preparations in total, in one
 * transaction of INSERT … SELECT (no API calls). Clones use the same material lot and balance, are created on days
 * before the demo (so a one-day trace on a demo day has the same answer at every scale) and expired long ago (so
 * the expiry digest's answer does not grow either).
 */
export async function fillPreparations(sequelize: Sequelize, target: number): Promise<void> {
  const [{ n }] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM preparations', { type: QueryTypes.SELECT });
  if (n >= target) return;
  const cols = (await sequelize.query<{ name: string }>('PRAGMA table_info(preparations)', { type: QueryTypes.SELECT })).map((c) => c.name);
  const [{ id: templateId }] = await sequelize.query<{ id: number }>("SELECT id FROM preparations WHERE status = 'verified' ORDER BY id LIMIT 1", { type: QueryTypes.SELECT });
  const [{ maxId }] = await sequelize.query<{ maxId: number }>('SELECT MAX(id) AS maxId FROM preparations', { type: QueryTypes.SELECT });
  const count = target - n;
  const computed: Record<string, string> = {
    id: `${maxId} + s.i`,
    identifier: `printf('BEN-%04d-%04d', 2000 + (${maxId} + s.i) / 10000, 1 + (${maxId} + s.i) % 10000)`,
    created_on: `date('2020-01-01', '+' || (s.i % 1500) || ' days')`,
    created_at: `date('2020-01-01', '+' || (s.i % 1500) || ' days') || 'T09:00:00.000Z'`,
    updated_at: `date('2020-01-01', '+' || (s.i % 1500) || ' days') || 'T09:00:00.000Z'`,
    expires_on: `date('2020-02-01', '+' || (s.i % 1500) || ' days')`,
    series_id: 'NULL',
  };
  const select = cols.map((c) => computed[c] ?? `p.${c}`).join(', ');
  const wCols = (await sequelize.query<{ name: string }>('PRAGMA table_info(weighings)', { type: QueryTypes.SELECT })).map((c) => c.name).filter((c) => c !== 'id');
  const mCols = (await sequelize.query<{ name: string }>('PRAGMA table_info(make_ups)', { type: QueryTypes.SELECT })).map((c) => c.name).filter((c) => c !== 'id');
  const child = (c: string) => (c === 'preparation_id' ? `${maxId} + s.i` : c === 'supersedes_id' ? 'NULL' : c === 'recorded_at' ? `date('2020-01-01', '+' || (s.i % 1500) || ' days') || 'T10:00:00.000Z'` : `x.${c}`);
  const series = `WITH RECURSIVE s(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM s WHERE i < ${count})`;
  await sequelize.transaction(async (transaction) => {
    await sequelize.query(`${series} INSERT INTO preparations (${cols.join(', ')}) SELECT ${select} FROM s, preparations p WHERE p.id = ${templateId}`, { transaction });
    await sequelize.query(
      `${series} INSERT INTO weighings (${wCols.join(', ')}) SELECT ${wCols.map(child).join(', ')} FROM s, (SELECT * FROM weighings WHERE preparation_id = ${templateId} AND supersedes_id IS NULL ORDER BY id LIMIT 1) x`,
      { transaction },
    );
    await sequelize.query(
      `${series} INSERT INTO make_ups (${mCols.join(', ')}) SELECT ${mCols.map(child).join(', ')} FROM s, (SELECT * FROM make_ups WHERE preparation_id = ${templateId} ORDER BY id LIMIT 1) x`,
      { transaction },
    );
  });
}

/** Audit entries up to `target` (the list does not verify the chain; the hashes are filler). */
async function fillAudit(sequelize: Sequelize, target: number): Promise<void> {
  const [{ n }] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM audit_entries', { type: QueryTypes.SELECT });
  if (n >= target) return;
  await sequelize.query(
    `WITH RECURSIVE s(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM s WHERE i < ${target - n})
     INSERT INTO audit_entries (occurred_at, actor_id, actor_name, action, entity, entity_id, changes, reason, prev_hash, hash)
     SELECT strftime('%Y-%m-%dT%H:%M:%fZ', '2020-01-01', '+' || (s.i * 60) || ' seconds'), 2, 'Bench filler', 'update', 'preparation', 'BEN-' || s.i,
            '[{"field":"notes","oldValue":null,"newValue":"filler"}]', NULL, printf('%064d', s.i - 1), printf('%064d', s.i) FROM s`,
  );
}

// ------------------------------------------------------------------ servers

interface Spawned {
  child: ChildProcess;
  base: string;
  startMs: number;
  log: () => string;
}

async function waitFor200(url: string, child: ChildProcess, limitMs: number): Promise<void> {
  const until = Date.now() + limitMs;
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`the server exited (${child.exitCode})`);
    try {
      const res = await fetch(url);
      if (res.status === 200) return;
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error(`no 200 from ${url} within ${limitMs} ms`);
}

async function spawnServer(cmd: string[], env: NodeJS.ProcessEnv, healthPath: string): Promise<Spawned> {
  const port = await freePort();
  const t0 = performance.now();
  const child = spawn(cmd[0]!, cmd.slice(1), { cwd: ROOT, env: { ...env, PORT: String(port), HOST: '127.0.0.1' }, detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  const base = `http://127.0.0.1:${port}`;
  try {
    await waitFor200(base + healthPath, child, 120_000);
  } catch (err) {
    stop(child);
    throw new Error(`${(err as Error).message}\n${out}`);
  }
  return { child, base, startMs: performance.now() - t0, log: () => out };
}

function stop(child: ChildProcess): Promise<void> {
  return new Promise((res) => {
    if (child.exitCode !== null) return res();
    const force = setTimeout(() => {
      try {
        process.kill(-child.pid!, 'SIGKILL');
      } catch {
        /* gone */
      }
    }, 10_000);
    force.unref();
    child.once('exit', () => {
      clearTimeout(force); // never signal a process group id that may be reused
      res();
    });
    try {
      process.kill(-child.pid!, 'SIGTERM');
    } catch {
      clearTimeout(force);
      res();
    }
  });
}

const BARE_EXPRESS = `
import express from 'express';
const app = express();
app.disable('x-powered-by');
app.get('/api/health', (_req, res) => res.json({ status: 'ok' }));
app.get('/json', (_req, res) => res.json({ items: [{ id: 1, identifier: 'HWL-2026-0001', status: 'verified' }], total: 1, page: 1, pageSize: 25 }));
app.listen(Number(process.env.PORT), '127.0.0.1');
`;

function serverEnv(dbPath: string): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = { ...process.env, TAREBOOK_DB: dbPath, MAIL_MODE: 'off', SESSION_SECRET: SECRET, LOGIN_RATE_LIMIT: '1000' };
  delete env.NODE_ENV; // as a user's `npm start`
  delete env.VITE_MIDDLEWARE;
  return env;
}

async function signIn(base: string, email: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
  const cookie = res.headers.getSetCookie().find((c) => c.startsWith('tarebook_session='))?.split(';')[0];
  if (!cookie) throw new Error(`bench: sign-in of ${email} failed (${res.status})`);
  return cookie;
}

interface Cannon {
  rps: number;
  p99: number;
  non2xx: number;
  errors: number;
}

async function cannon(url: string, seconds: number, opts: { cookie?: string; method?: 'GET' | 'POST'; body?: string } = {}): Promise<Cannon> {
  const headers: Record<string, string> = {};
  if (opts.cookie) headers.cookie = opts.cookie;
  if (opts.body) headers['content-type'] = 'application/json';
  const r = await autocannon({ url, connections: 50, duration: seconds, method: opts.method ?? 'GET', headers, body: opts.body });
  return { rps: r.requests.average, p99: r.latency.p99, non2xx: r.non2xx, errors: r.errors + r.timeouts };
}

// ------------------------------------------------------------------ phases

async function startupPhase(dbPath: string, cmd: string[], runs: number): Promise<void> {
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const s = await spawnServer(cmd, serverEnv(dbPath), '/api/health');
    times.push(s.startMs);
    await stop(s.child);
  }
  const bare: number[] = [];
  for (let i = 0; i < runs; i++) {
    const s = await spawnServer([process.execPath, '--input-type=module', '-e', BARE_EXPRESS], serverEnv(dbPath), '/api/health');
    bare.push(s.startMs);
    await stop(s.child);
  }
  const ms = median(times);
  record({ group: 'start-up', name: 'npm start on an existing database → first 200', value: ms, unit: 'ms', goal: '≤ 2000 ms', pass: ms <= 2000, detail: `bare node+express ${median(bare).toFixed(0)} ms; runs ${times.map((t) => t.toFixed(0)).join(', ')}` });
}

async function httpPhase(dbPath: string, cmd: string[], seconds: number, rounds: number): Promise<void> {
  const real = await spawnServer(cmd, serverEnv(dbPath), '/api/health');
  const bare = await spawnServer([process.execPath, '--input-type=module', '-e', BARE_EXPRESS], serverEnv(dbPath), '/api/health');
  try {
    if (real.child.exitCode !== null) throw new Error(`the server exited (${real.child.exitCode}):\n${real.log()}`);
    const chemist = await signIn(real.base, 'chemist@harbourside.example').catch((err: Error) => {
      throw new Error(`${err.message} (server ${real.child.exitCode === null ? 'running' : `exited ${real.child.exitCode}`}):\n${real.log()}`);
    });
    const qa = await signIn(real.base, 'qa@harbourside.example');
    const list = await (await fetch(`${real.base}/api/preparations?pageSize=100&search=HWL`, { headers: { cookie: chemist } })).json();
    const demo = (list.items as Array<{ identifier: string; status: string }>).find((p) => p.status === 'verified');
    if (!demo) throw new Error('bench: no verified demo preparation');
    const calcBody = await calcRequestOf(dbPath, demo.identifier);
    const targets: Array<{ name: string; goal: number; p99Goal?: number; url: string; cookie: string; method?: 'GET' | 'POST'; body?: string }> = [
      { name: 'list, first page of 10,000 preparations', goal: 60, p99Goal: 30, url: `${real.base}/api/preparations`, cookie: chemist },
      { name: 'record detail', goal: 50, url: `${real.base}/api/preparations/${demo.identifier}`, cookie: chemist },
      { name: 'calculation (POST /api/calc/preparation)', goal: 50, url: `${real.base}/api/calc/preparation`, cookie: chemist, method: 'POST', body: calcBody },
      { name: 'audit list, 100,000 entries', goal: 60, url: `${real.base}/api/audit`, cookie: qa },
    ];
    for (const t of targets) {
      const ratios: number[] = [];
      const p99s: number[] = [];
      const rpsReal: number[] = [];
      const rpsBare: number[] = [];
      let bad = 0;
      for (let r = 0; r < rounds; r++) {
        const b = await cannon(`${bare.base}/json`, seconds);
        const x = await cannon(t.url, seconds, { cookie: t.cookie, method: t.method, body: t.body });
        bad += x.non2xx + x.errors;
        ratios.push((100 * x.rps) / b.rps);
        p99s.push(x.p99);
        rpsReal.push(x.rps);
        rpsBare.push(b.rps);
      }
      const ratio = median(ratios);
      record({ group: 'http', name: `${t.name} vs bare Express`, value: ratio, unit: '%', goal: `≥ ${t.goal} %`, pass: ratio >= t.goal && bad === 0, detail: `${median(rpsReal).toFixed(0)} vs ${median(rpsBare).toFixed(0)} req/s, p99 ${median(p99s).toFixed(0)} ms${bad ? `, ${bad} non-2xx/errors` : ''}` });
      if (t.p99Goal !== undefined) {
        const p99 = median(p99s);
        record({ group: 'http', name: `${t.name}: p99 latency at 50 connections`, value: p99, unit: 'ms', goal: `≤ ${t.p99Goal} ms`, pass: p99 <= t.p99Goal && median(rpsReal) > 0 });
      }
    }
  } finally {
    await stop(real.child);
    await stop(bare.child);
  }
}

async function calcRequestOf(dbPath: string, identifier: string): Promise<string> {
  const sequelize = await openDatabase(dbPath);
  try {
    const [row] = await sequelize.query<{ plan: string }>('SELECT plan FROM preparations WHERE identifier = ?', { replacements: [identifier], type: QueryTypes.SELECT });
    return JSON.stringify((JSON.parse(row!.plan) as { calcRequest: unknown }).calcRequest);
  } finally {
    await sequelize.close();
  }
}

/**
 * Open a bench database with the audit chain keyed as the server will key it (the data folder's key outside
 * production): `npm run bench` runs with NODE_ENV=production, where an unconfigured chain is refused.
 */
async function openBenchDatabase(dbPath: string): Promise<Sequelize> {
  const sequelize = await openDatabase(dbPath);
  configureAuditChain(sequelize, { key: devChainKey(dirname(dbPath)), anchorFile: null });
  return sequelize;
}

interface InProcess {
  app: Express;
  sequelize: Sequelize;
  chemist: string;
  qa: string;
}

async function inProcess(dbPath: string): Promise<InProcess> {
  const sequelize = await openDatabase(dbPath);
  const config = loadConfig({ NODE_ENV: 'test', TAREBOOK_DB: dbPath, SESSION_SECRET: SECRET, LOGIN_RATE_LIMIT: '1000' });
  const app = createApp({ sequelize, config, distDir: join(dbPath, '..', 'no-dist') });
  const login = async (email: string) => {
    const res = await request(app).post('/api/auth/login').send({ email, password: DEMO_PASSWORD });
    const c = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((x) => x.startsWith('tarebook_session='))?.split(';')[0];
    if (!c) throw new Error(`bench: sign-in failed (${res.status})`);
    return c;
  };
  return { app, sequelize, chemist: await login('chemist@harbourside.example'), qa: await login('qa@harbourside.example') };
}

/** Median ms of `fn` (after one warm-up), at most `runs` runs or `maxMs`. */
async function timeIt(fn: () => Promise<unknown>, runs: number, maxMs: number): Promise<number> {
  await fn();
  const ts: number[] = [];
  const until = performance.now() + maxMs;
  while (ts.length < runs && (ts.length < 3 || performance.now() < until)) {
    const t0 = performance.now();
    await fn();
    ts.push(performance.now() - t0);
  }
  return median(ts);
}

async function pdfPhase(ctx: InProcess, quick: boolean): Promise<void> {
  const get = async (path: string) => {
    const res = await request(ctx.app).get(path).set('Cookie', ctx.chemist).buffer(true);
    if (res.status !== 200) throw new Error(`${path} → ${res.status}`);
  };
  const list = await request(ctx.app).get('/api/preparations?pageSize=100&search=HWL').set('Cookie', ctx.chemist);
  const complete = (list.body.items as Array<{ identifier: string; stage: string }>).find((p) => p.stage === 'complete')!;
  const templates = await request(ctx.app).get('/api/label-templates').set('Cookie', ctx.chemist);
  const sheet = (templates.body.items as Array<{ id: number; name: string }>).find((x) => x.name === 'A4 sheet 3×8 full')!;
  const prep = () => get(`/api/preparations/${complete.identifier}/prep-sheet.pdf`);
  const labels = () => get(`/api/preparations/${complete.identifier}/labels-preview.pdf?templateId=${sheet.id}&copies=100`);
  const t0 = performance.now();
  await prep();
  const cold = performance.now() - t0;
  const runs = quick ? 5 : 15;
  const minimal = await timeIt(() => renderMinimal(), runs, 10_000);
  const prepMs = await timeIt(prep, runs, 20_000);
  const labelsMs = await timeIt(labels, quick ? 3 : 8, 30_000);
  record({ group: 'pdf', name: 'prep sheet, cold first render in the process', value: cold, unit: 'ms', goal: '≤ 1000 ms', pass: cold <= 1000 });
  record({ group: 'pdf', name: 'prep sheet ÷ minimal one-page render (warm)', value: prepMs / minimal, unit: '×', goal: '≤ 3×', pass: prepMs / minimal <= 3, detail: `${prepMs.toFixed(0)} ms vs ${minimal.toFixed(1)} ms` });
  record({ group: 'pdf', name: '100 labels ÷ minimal one-page render (warm)', value: labelsMs / minimal, unit: '×', goal: '≤ 10×', pass: labelsMs / minimal <= 10, detail: `${labelsMs.toFixed(0)} ms` });
}

async function calcPhase(dbPath: string, quick: boolean): Promise<void> {
  const sequelize = await openDatabase(dbPath);
  const rows = await sequelize.query<{ plan: string }>("SELECT plan FROM preparations WHERE identifier LIKE 'HWL-%' ORDER BY id", { type: QueryTypes.SELECT });
  await sequelize.close();
  const requests = rows.map((r) => (JSON.parse(r.plan) as { calcRequest: Parameters<typeof calculatePreparation>[0] }).calcRequest).filter(Boolean);
  const ts: number[] = [];
  for (let i = 0; i < 20; i++) for (const r of requests) calculatePreparation(r); // warm-up
  const until = performance.now() + (quick ? 2000 : 5000);
  while (performance.now() < until) {
    for (const r of requests) {
      const t0 = performance.now();
      calculatePreparation(r);
      ts.push(performance.now() - t0);
    }
  }
  const m = median(ts);
  record({ group: 'core', name: `plan with its budget (${requests.length} demo plans)`, value: m, unit: 'ms', goal: '≤ 0.5 ms median', pass: m <= 0.5, detail: `${ts.length} runs` });
  await monteCarloPhase(requests[0]!, quick);
}

/** Monte Carlo (JCGM 101), 10⁵ trials of a demo plan weighed at its planned reading: in the core, and through the worker thread. */
async function monteCarloPhase(plan: Parameters<typeof calculatePreparation>[0], quick: boolean): Promise<void> {
  const reading = calculatePreparation(plan).balanceReading;
  const req = { ...plan, weighing: { reading } };
  const model = preparationMonteCarloModel(req)!;
  const runs = quick ? 3 : 7;
  runMonteCarlo(model, { trials: 100_000, seed: 1 }); // warm-up
  const core: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    runMonteCarlo(model, { trials: 100_000, seed: i + 1 });
    core.push(performance.now() - t0);
  }
  const mc = median(core);
  record({ group: 'core', name: 'Monte Carlo, 10⁵ trials (one demo plan)', value: mc, unit: 'ms', goal: '≤ 300 ms median', pass: mc <= 300, detail: `${runs} runs, ${model.inputs.length} inputs` });
  await runMonteCarloInWorker({ kind: 'preparation', request: req, trials: 100_000, seed: 1 }); // starts the worker
  const viaWorker: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await runMonteCarloInWorker({ kind: 'preparation', request: req, trials: 100_000, seed: i + 1 });
    viaWorker.push(performance.now() - t0);
  }
  await stopMonteCarloWorker();
  const w = median(viaWorker);
  record({ group: 'core', name: 'Monte Carlo, 10⁵ trials through the worker thread', value: w, unit: 'ms', goal: '≤ 300 ms median', pass: w <= 300, detail: `${runs} runs, model rebuilt in the worker` });
}

async function scalingPhase(dir: string, quick: boolean): Promise<void> {
  const dbPath = join(dir, 'scaling.sqlite');
  const seq = await openBenchDatabase(dbPath);
  await migrateUp(seq);
  await seedDemoLab(seq, { env: { NODE_ENV: 'test' }, passwordHash: await hashPassword(DEMO_PASSWORD) });
  await seq.close();
  const ctx = await inProcess(dbPath);
  const q = async (sql: string) => (await ctx.sequelize.query<Record<string, string>>(sql, { type: QueryTypes.SELECT }))[0]!;
  const standard = (await q("SELECT identifier FROM preparations WHERE status = 'verified' AND identifier LIKE 'HWL-%' ORDER BY id LIMIT 1")).identifier!;
  const day = (await q(`SELECT created_on AS d FROM preparations WHERE identifier = '${standard}'`)).d!;
  const lot = (await q(`SELECT m.lot AS lot FROM preparations p JOIN reference_materials m ON m.id = p.material_id WHERE p.identifier = '${standard}'`)).lot!;
  const balance = (await q(`SELECT b.identifier AS b FROM preparations p JOIN balances b ON b.id = p.balance_id WHERE p.identifier = '${standard}'`)).b!;
  const get = (path: string, cookie = ctx.chemist) => async () => {
    const res = await request(ctx.app).get(path).set('Cookie', cookie);
    if (res.status !== 200) throw new Error(`${path} → ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`);
    return res.body;
  };
  const cases: Array<{ name: string; run: () => Promise<unknown> }> = [
    { name: 'list, first page', run: get('/api/preparations') },
    { name: 'detail', run: get(`/api/preparations/${standard}`) },
    { name: 'search (material name)', run: get('/api/preparations?search=nitrate') },
    { name: `trace of a standard (${standard})`, run: get(`/api/trace/${standard}`) },
    { name: `trace of a lot, one day (${lot} on ${day})`, run: get(`/api/trace/${encodeURIComponent(lot)}?from=${day}&to=${day}`) },
    { name: `trace of a balance, one day (${balance})`, run: get(`/api/trace/${balance}?from=${day}&to=${day}`) },
    { name: 'expiry job (digest)', run: () => runExpiryDigest(new Date(), { publicUrl: 'http://localhost', actor: null }) },
  ];
  const scales = [1_000, 10_000, 100_000];
  const table: Record<string, number[]> = {};
  const heap: number[] = [];
  for (const n of scales) {
    const t0 = performance.now();
    await fillPreparations(ctx.sequelize, n);
    console.log(`   (filled to ${n} preparations in ${((performance.now() - t0) / 1000).toFixed(1)} s)`);
    for (const c of cases) (table[c.name] ??= []).push(await timeIt(c.run, quick ? 5 : 11, quick ? 3000 : 8000));
    global.gc?.();
    const before = process.memoryUsage().heapUsed;
    let peak = before;
    const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().heapUsed)), 5);
    await cases[4]!.run();
    clearInterval(sampler);
    peak = Math.max(peak, process.memoryUsage().heapUsed);
    heap.push((peak - before) / 1e6);
  }
  console.log(`\n   ${'case'.padEnd(58)} ${scales.map((s) => `${s / 1000}k ms`.padStart(10)).join('')}`);
  for (const [name, ts] of Object.entries(table)) console.log(`   ${name.padEnd(58)} ${ts.map((t) => t.toFixed(1).padStart(10)).join('')}`);
  console.log('');
  for (const [name, ts] of Object.entries(table)) {
    const growth = ts.at(-1)! / ts[0]!;
    record({ group: 'scaling', name: `${name.replace(/ \(.*\)$/, '')}: 100k ÷ 1k`, value: growth, unit: '×', goal: '≤ 1.5× (answer the same size)', pass: growth <= 1.5, detail: ts.map((t) => t.toFixed(1)).join(' / ') + ' ms' });
  }
  const heapGrowth = heap.at(-1)! - heap[0]!;
  record({ group: 'scaling', name: 'lot trace heap, 100k minus 1k (same answer)', value: heapGrowth, unit: 'MB', goal: '≤ 20 MB (bounded by the answer)', pass: heapGrowth <= 20, detail: heap.map((h) => h.toFixed(1)).join(' / ') + ' MB peak over start' });
  await ctx.sequelize.close();
}

export async function runGoals({ quick }: { quick: boolean }): Promise<boolean> {
  const dir = mkdtempSync(join(tmpdir(), 'tarebook-bench-'));
  const dbPath = join(dir, 'bench.sqlite');
  const cmd = process.env.BENCH_SERVER_CMD ? process.env.BENCH_SERVER_CMD.split(' ') : [process.execPath, 'scripts/start.mjs'];
  const t0 = performance.now();
  try {
    console.log(`# issue 11 goals${quick ? ' (--quick)' : ''}: server "${cmd.join(' ')}"\n`);
    const sequelize = await openBenchDatabase(dbPath);
    await migrateUp(sequelize);
    await seedDemoLab(sequelize, { env: { NODE_ENV: 'test' }, passwordHash: await hashPassword(DEMO_PASSWORD) });
    await fillPreparations(sequelize, 10_000);
    await fillAudit(sequelize, 100_000);
    await sequelize.close();
    console.log(`   (database with 10,000 preparations and 100,000 audit entries in ${((performance.now() - t0) / 1000).toFixed(1)} s)`);

    if (!process.env.BENCH_SERVER_CMD) {
      // compile once, as `npm run build` does: the start-up goal is a start on an existing build and database
      const { buildServer, needsServerBuild } = (await import(join(ROOT, 'scripts', 'build-server.mjs'))) as { buildServer(): Promise<void>; needsServerBuild(): boolean };
      if (needsServerBuild()) await buildServer();
    }
    await startupPhase(dbPath, cmd, quick ? 1 : 3);
    await httpPhase(dbPath, cmd, quick ? 2 : 5, 3);
    const ctx = await inProcess(dbPath);
    await pdfPhase(ctx, quick);
    await ctx.sequelize.close();
    await calcPhase(dbPath, quick);
    await scalingPhase(dir, quick);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  const out = join(ROOT, 'bench-results.json');
  let previous: { lines?: Line[] } | null = null;
  if (existsSync(out)) {
    previous = JSON.parse(readFileSync(out, 'utf8')) as { lines?: Line[] };
    renameSync(out, join(ROOT, 'bench-results.prev.json'));
  }
  const failed = lines.filter((l) => l.pass === false).length;
  writeFileSync(out, JSON.stringify({ at: new Date().toISOString(), quick, server: cmd.join(' '), seconds: Math.round((performance.now() - t0) / 1000), failed, lines }, null, 2) + '\n');
  if (previous?.lines) {
    console.log('\n   compared with the last run (bench-results.prev.json):');
    for (const l of lines) {
      const p = previous.lines.find((x) => x.group === l.group && x.name === l.name);
      if (p) console.log(`   ${`${l.group}: ${l.name}`.padEnd(58)} ${String(p.value.toFixed(2)).padStart(10)} → ${l.value.toFixed(2)} ${l.unit}`);
    }
  }
  console.log(`\n${failed ? `${failed} FAIL` : 'all PASS'} of ${lines.filter((l) => l.pass !== null).length}; written to bench-results.json (${Math.round((performance.now() - t0) / 1000)} s)`);
  return failed === 0;
}
