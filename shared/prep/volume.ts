/**
 * Volumes of glassware and temperature corrections for made-up standards.
 * All inputs are decimal strings; results are decimal strings at full (40-digit) precision.
 */
import { D, toDec, type Dec } from '../calc/decimal.ts';
import { CalcError } from '../calc/errors.ts';

const REFERENCE_TEMPERATURE_C = new D(20);

function positive(x: string, name: string): Dec {
  const d = toDec(x, name);
  if (d.lte(0)) throw new CalcError('non_positive', `${name} must be greater than zero, got ${x}`, { field: name });
  return d;
}

function temperature(x: string, name: string): Dec {
  const t = toDec(x, name);
  // liquid-water range of a laboratory; outside it the linear expansion laws below do not hold
  if (t.lt(0) || t.gt(40)) {
    throw new CalcError('calc_out_of_range', `${name} must be between 0 and 40 °C, got ${x}`, { field: name });
  }
  return t;
}

/**
 * Volume of glassware calibrated at 20 °C when it is at temperature t:
 * V(t) = V20 · [1 + γ · (t − 20 °C)], γ = cubic expansion coefficient of the glass
 * (METROLOGY §4.3: borosilicate 3.3 → 9.9e-6 /K, soda-lime → 27e-6 /K; ISO 4787 form).
 */
export function flaskVolumeAtTemperature(input: {
  nominalMl: string;
  glassExpansionPerK: string;
  temperatureC: string;
}): string {
  const v20 = positive(input.nominalMl, 'nominalMl');
  const gamma = toDec(input.glassExpansionPerK, 'glassExpansionPerK');
  if (gamma.lt(0)) throw new CalcError('calc_out_of_range', 'glassExpansionPerK must not be negative', { field: 'glassExpansionPerK' });
  const t = temperature(input.temperatureC, 'temperatureC');
  return v20.times(gamma.times(t.minus(REFERENCE_TEMPERATURE_C)).plus(1)).toString();
}

/**
 * Factor that converts m/V_nominal of a solution made up to the mark at t_makeup into its
 * concentration at 20 °C (METROLOGY §9): c(20 °C) = (m/V) · [1 + β · (t_makeup − 20 °C)],
 * β = cubic expansion coefficient of the solvent; the glass's own expansion is neglected.
 * Methanol (β ≈ 1.2e-3 /K) made up at 25 °C → 1.006, i.e. about 0.6 % higher.
 */
export function concentrationTemperatureCorrection(input: { solventExpansionPerK: string; makeUpTemperatureC: string }): string {
  const beta = toDec(input.solventExpansionPerK, 'solventExpansionPerK');
  if (beta.lt(0)) throw new CalcError('calc_out_of_range', 'solventExpansionPerK must not be negative', { field: 'solventExpansionPerK' });
  const t = temperature(input.makeUpTemperatureC, 'makeUpTemperatureC');
  return beta.times(t.minus(REFERENCE_TEMPERATURE_C)).plus(1).toString();
}

export type VolumetricKind = 'flask' | 'pipette';

export interface ClassATolerance {
  /** maximum permissible error at 20 °C, ± mL, as tabulated */
  toleranceMl: string;
  standard: 'ISO 1042' | 'ISO 648';
  /** METROLOGY §4.4 marks both tables [M]: from memory, to be checked against the purchased standards */
  fromMemory: true;
}

// METROLOGY §4.4 [M]: these tables are from memory (the standards could not be opened);
// check them against the purchased ISO 1042 / ISO 648 before relying on them.
// ISO 1042 class A one-mark volumetric flasks, ± mL (incl. the 5, 20, 200, 2000 mL values of §4.4).
const ISO_1042_CLASS_A: ReadonlyArray<readonly [string, string]> = [
  ['5', '0.025'],
  ['10', '0.025'],
  ['20', '0.04'],
  ['25', '0.04'],
  ['50', '0.06'],
  ['100', '0.10'],
  ['200', '0.15'],
  ['250', '0.15'],
  ['500', '0.25'],
  ['1000', '0.40'],
  ['2000', '0.60'],
];
// ISO 648 class A one-mark (bulb) pipettes, ± mL (incl. the 100 mL value of §4.4).
const ISO_648_CLASS_A: ReadonlyArray<readonly [string, string]> = [
  ['1', '0.008'],
  ['2', '0.010'],
  ['5', '0.015'],
  ['10', '0.020'],
  ['20', '0.030'],
  ['25', '0.030'],
  ['50', '0.050'],
  ['100', '0.08'],
];

/**
 * Class A tolerance of a one-mark flask (ISO 1042) or bulb pipette (ISO 648) of the given nominal
 * volume ("100" and "100.0" are the same), or undefined when the volume is not tabulated.
 */
export function classATolerance(kind: VolumetricKind, nominalMl: string): ClassATolerance | undefined {
  const v = toDec(nominalMl, 'nominalMl');
  const table = kind === 'flask' ? ISO_1042_CLASS_A : ISO_648_CLASS_A;
  const row = table.find(([n]) => v.eq(n));
  if (!row) return undefined;
  return { toleranceMl: row[1], standard: kind === 'flask' ? 'ISO 1042' : 'ISO 648', fromMemory: true };
}
