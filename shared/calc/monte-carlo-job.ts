/**
 * One Monte Carlo run as plain data, so it can be posted to a worker thread (server/services/monte-carlo.service.ts):
 * the worker rebuilds the model from the same request the GUM budget was computed from and runs monte-carlo.ts.
 */
import { CalcError } from './errors.ts';
import { runMonteCarlo, type McResultText } from './monte-carlo.ts';
import { preparationMonteCarloModel, type PreparationRequest } from './preparation.ts';
import { volumetricDilutionMonteCarloModel, type VolumetricDilutionInput } from './dilution.ts';

export type McJob =
  | { kind: 'preparation'; request: PreparationRequest; trials: number; seed: number }
  | { kind: 'volumetricDilution'; input: VolumetricDilutionInput; trials: number; seed: number };

export function runMonteCarloJob(job: McJob): McResultText {
  if (job.kind === 'preparation') {
    const m = preparationMonteCarloModel(job.request);
    if (!m) throw new CalcError('missing_input', 'Monte Carlo propagates the actual concentration: enter the balance reading first', { field: 'weighing.reading.value' });
    return runMonteCarlo(m, { trials: job.trials, seed: job.seed });
  }
  return runMonteCarlo(volumetricDilutionMonteCarloModel(job.input), { trials: job.trials, seed: job.seed });
}
