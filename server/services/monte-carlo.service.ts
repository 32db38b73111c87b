/**
 * Runs Monte Carlo jobs (shared/calc/monte-carlo-job.ts) in one long-lived worker thread (node:worker_threads), so
 * the event loop keeps answering other requests while the trials run. Jobs queue in the worker one at a time (the
 * machine's cores are shared with the rest of the server). The worker is started on first use; it holds the
 * process open only while a job is pending; if it dies, the pending jobs fail with a 500-free error and the next
 * job starts a new worker.
 * Under tsx (dev, tests) the worker is the .ts file loaded with tsx's loader; in the compiled server (build/) it is
 * the .js file beside this one.
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { CalcError, type CalcErrorCode } from '../../shared/calc/errors.ts';
import type { McJob } from '../../shared/calc/monte-carlo-job.ts';
import type { McResultText } from '../../shared/calc/monte-carlo.ts';

type Pending = { resolve: (r: McResultText) => void; reject: (e: unknown) => void };

let worker: Worker | null = null;
let nextId = 1;
const pending = new Map<number, Pending>();
const stats = { workersStarted: 0, jobsRun: 0, lastThreadId: -1 };

/** How many workers were started and jobs run (tests show the work left the main thread). */
export function monteCarloWorkerStats(): Readonly<typeof stats> {
  return { ...stats };
}

function startWorker(): Worker {
  const ts = import.meta.url.endsWith('.ts');
  let w: Worker;
  if (ts) {
    // Under tsx or vitest: register tsx's ESM loader inside the worker, then load the TypeScript worker module.
    // (tsx/esm/api's ESM build: its "require" build cannot be imported from an ESM worker)
    const tsxApi = pathToFileURL(join(dirname(createRequire(import.meta.url).resolve('tsx/package.json')), 'dist/esm/api/index.mjs')).href;
    const entry = new URL('./monte-carlo.worker.ts', import.meta.url).href;
    w = new Worker(`import(${JSON.stringify(tsxApi)}).then((m) => { m.register(); return import(${JSON.stringify(entry)}); });`, { eval: true, execArgv: [] });
  } else {
    w = new Worker(new URL('./monte-carlo.worker.js', import.meta.url), { execArgv: [] });
  }
  stats.workersStarted++;
  stats.lastThreadId = w.threadId;
  w.on('message', (msg: { id: number; ok: boolean; result?: McResultText; error?: { calc: boolean; code?: CalcErrorCode; message: string; field?: string; details?: Record<string, unknown> } }) => {
    const p = pending.get(msg.id);
    if (!p) return;
    pending.delete(msg.id);
    if (pending.size === 0) w.unref();
    if (msg.ok) {
      stats.jobsRun++;
      p.resolve(msg.result!);
    } else if (msg.error?.calc) {
      p.reject(new CalcError(msg.error.code!, msg.error.message, { ...(msg.error.field !== undefined ? { field: msg.error.field } : {}), ...(msg.error.details ? { details: msg.error.details } : {}) }));
    } else {
      p.reject(new Error(`Monte Carlo worker: ${msg.error?.message ?? 'unknown failure'}`));
    }
  });
  const fail = (e: unknown) => {
    if (worker === w) worker = null;
    for (const [id, p] of pending) {
      pending.delete(id);
      p.reject(e instanceof Error ? e : new Error(String(e)));
    }
  };
  w.on('error', fail);
  w.on('exit', (code) => fail(new Error(`Monte Carlo worker stopped (exit code ${code})`)));
  w.unref();
  return w;
}

/** Run one job in the worker thread; CalcError comes back as CalcError (a 400 with its field). */
export function runMonteCarloInWorker(job: McJob): Promise<McResultText> {
  if (!worker) worker = startWorker();
  const w = worker;
  const id = nextId++;
  return new Promise<McResultText>((resolve, reject) => {
    pending.set(id, { resolve, reject });
    w.ref();
    w.postMessage({ id, job });
  });
}

/** Stop the worker (tests and shutdown); pending jobs are refused. */
export async function stopMonteCarloWorker(): Promise<void> {
  const w = worker;
  worker = null;
  if (w) await w.terminate();
}
