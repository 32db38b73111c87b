/**
 * The preparation result as the page reads it: exactly what `calculatePreparation()` returns and
 * what `POST /api/calc/preparation` sends (every number a decimal string).
 */
import type { BudgetRowText, CalcPreparationResponse } from '../../../shared/calc/preparation.ts';

export type PreparationView = CalcPreparationResponse;
export type BudgetRowView = BudgetRowText;
export type SigFigView = NonNullable<CalcPreparationResponse['actual']>['concentration']['significantFigures'];
