/**
 * Worker thread of the Monte Carlo propagation: runs one job at a time off the main thread, so a 10⁵-trial run
 * never holds up other requests. Loaded by monte-carlo.service.ts (as .ts under tsx, as .js from build/).
 */
import { parentPort } from 'node:worker_threads';
import { isCalcError } from '../../shared/calc/errors.ts';
import { runMonteCarloJob, type McJob } from '../../shared/calc/monte-carlo-job.ts';

parentPort!.on('message', (msg: { id: number; job: McJob }) => {
  try {
    parentPort!.postMessage({ id: msg.id, ok: true, result: runMonteCarloJob(msg.job) });
  } catch (e) {
    const error = isCalcError(e)
      ? { calc: true, code: e.code, message: e.message, field: e.field, details: e.details }
      : { calc: false, message: e instanceof Error ? e.message : String(e) };
    parentPort!.postMessage({ id: msg.id, ok: false, error });
  }
});
