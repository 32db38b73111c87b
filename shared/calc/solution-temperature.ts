/**
 * The temperature of a solution made up to the mark, added to a concentration computed by
 * calculatePreparation (which assumes the flask's 20 °C volume):
 *   c(20 °C) = c · f,  f = 1 + β·(t − 20 °C)   (METROLOGY §9; shared/prep/volume.ts)
 * - corrected: f from the measured solution temperature t; its uncertainty is the thermometer reading,
 *   rectangular ±0.5 °C [common practice];
 * - not corrected: f = 1 and the temperature enters as an uncertainty only, rectangular ±4 °C around 20 °C
 *   (EURACHEM/CITAC QUAM Example A1: ±4 °C × β × V, rectangular), widened to |t − 20| when the measured
 *   temperature lies further away.
 * The budget gains one row "temperature" (value t, u(t) in °C, sensitivity ∂c/∂t = c·β); every other
 * row's sensitivity and contribution scale by f. Inputs are independent, so variances add (GUM eq. 10).
 */
import { D, type Dec, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';
import { formatResult, significantFigureResult, type RoundingRule, type TypedInput } from './rounding.ts';
import { rectangular } from './uncertainty.ts';
import type { BudgetRowText } from './preparation.ts';

export const QUAM_A1_TEMPERATURE_HALF_WIDTH_C = '4';
export const THERMOMETER_HALF_WIDTH_C = '0.5';

export interface SolutionTemperatureInput {
  /** the concentration from calculatePreparation (actual) */
  value: string;
  standardUncertainty: string;
  unit: string;
  budget: BudgetRowText[];
  /** cubic expansion coefficient of the solvent, 1/K */
  betaPerK: string;
  /** solution temperature at make-up, °C */
  temperatureC: string;
  corrected: boolean;
  rule?: RoundingRule;
  /** inputs as typed for the significant-figure view */
  typedInputs: TypedInput[];
}

export interface SolutionTemperatureResult {
  factor: string;
  value: string;
  standardUncertainty: string;
  expandedUncertainty: string;
  k: '2';
  display: string;
  significantFigures: { value: string; significantFigures: number; limitedBy: string };
  budget: BudgetRowText[];
  temperatureHalfWidthC: string;
}

const out = (d: Dec) => d.toSignificantDigits(20).toFixed();
const outBudget = (d: Dec) => d.toSignificantDigits(15).toFixed();

export function withSolutionTemperature(input: SolutionTemperatureInput): SolutionTemperatureResult {
  const beta = toDec(input.betaPerK, 'betaPerK');
  if (beta.isNeg()) throw new CalcError('calc_out_of_range', 'The solvent expansion coefficient must not be negative', { field: 'betaPerK' });
  const t = toDec(input.temperatureC, 'temperatureC');
  if (t.lt(0) || t.gt(40)) throw new CalcError('calc_out_of_range', `The solution temperature must be between 0 and 40 °C, got ${input.temperatureC}`, { field: 'temperatureC' });
  const c0 = toDec(input.value, 'value');
  const u0 = toDec(input.standardUncertainty, 'standardUncertainty');
  const dt = t.minus(20);
  const factor = input.corrected ? beta.mul(dt).plus(1) : new D(1);
  const halfWidth = input.corrected
    ? new D(THERMOMETER_HALF_WIDTH_C)
    : D.max(new D(QUAM_A1_TEMPERATURE_HALF_WIDTH_C), dt.abs());
  const ut = rectangular(halfWidth);
  const value = c0.mul(factor);
  const sensitivity = c0.mul(beta); // ∂(c·(1 + β(t−20)))/∂t
  const cuT = sensitivity.mul(ut).abs();
  const uc = factor.mul(u0).pow(2).plus(cuT.pow(2)).sqrt();
  const variance = uc.pow(2);
  const share = (contribution: Dec) => (variance.isZero() ? new D(0) : contribution.pow(2).div(variance));
  const rows: BudgetRowText[] = input.budget.map((r) => {
    const contribution = toDec(r.contribution).mul(factor);
    return { ...r, sensitivity: outBudget(toDec(r.sensitivity).mul(factor)), contribution: outBudget(contribution), share: outBudget(share(contribution)) };
  });
  rows.push({
    input: 'temperature',
    label: input.corrected
      ? `Solution temperature (corrected to 20 °C with β = ${input.betaPerK} /K; thermometer ±${THERMOMETER_HALF_WIDTH_C} °C, rectangular)`
      : `Solution temperature (not corrected; ±${halfWidth.toString()} °C around 20 °C, rectangular, × β = ${input.betaPerK} /K, as in QUAM A1)`,
    unit: '°C',
    value: input.temperatureC,
    standardUncertainty: out(ut),
    sensitivity: outBudget(sensitivity),
    contribution: outBudget(cuT),
    share: outBudget(share(cuT)),
  });
  const U = uc.mul(2);
  const rule = input.rule ?? 'half-even';
  const sig = significantFigureResult(value, input.typedInputs, rule);
  return {
    factor: out(factor),
    value: out(value),
    standardUncertainty: out(uc),
    expandedUncertainty: out(U),
    k: '2',
    display: U.gt(0) ? formatResult(value, U, input.unit, '2', { rule }) : `${out(value)} ${input.unit}`,
    significantFigures: { value: sig.value, significantFigures: sig.significantFigures, limitedBy: sig.limitedBy ?? '' },
    budget: rows,
    temperatureHalfWidthC: halfWidth.toString(),
  };
}
