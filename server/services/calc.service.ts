/**
 * Preview calculation of a preparation: the server runs the same shared/calc core the client uses.
 * Nothing is stored here; recording a preparation recomputes from the raw inputs.
 */
import { calculatePreparation } from '../../shared/calc/preparation.ts';
import type { CalcPreparationRequest } from '../../shared/schemas/calc.ts';

export function previewPreparation(input: CalcPreparationRequest) {
  return calculatePreparation(input);
}
