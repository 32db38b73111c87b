/**
 * Preview calculation of a preparation: the server runs the same shared/calc core the client uses.
 * Nothing is stored here; recording a preparation recomputes from the raw inputs.
 * With `monteCarlo` the actual concentration is also propagated by Monte Carlo (JCGM 101) in the worker thread.
 */
import { CalcError } from '../../shared/calc/errors.ts';
import { calculatePreparation, type CalcPreparationResponse } from '../../shared/calc/preparation.ts';
import { monteCarloNumbers, type CalcPreparationRequest } from '../../shared/schemas/calc.ts';
import { runMonteCarloInWorker } from './monte-carlo.service.ts';

export async function previewPreparation(input: CalcPreparationRequest): Promise<CalcPreparationResponse> {
  const { monteCarlo, ...request } = input;
  const result = calculatePreparation(request);
  if (monteCarlo === undefined) return result;
  if (!result.actual) {
    throw new CalcError('missing_input', 'Monte Carlo propagates the actual concentration: enter the balance reading first', { field: 'weighing.reading.value' });
  }
  const { trials, seed } = monteCarloNumbers(monteCarlo);
  result.actual.monteCarlo = await runMonteCarloInWorker({ kind: 'preparation', request, trials, seed });
  return result;
}
