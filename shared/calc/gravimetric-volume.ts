/**
 * Volume from the mass of water delivered or contained (gravimetric calibration of volumetric ware).
 * Source: ISO 4787 / ISO 8655-6 structure: V20 = m'·[1/(ρW − ρA)]·(1 − ρA/ρB)·[1 − γ·(t − 20 °C)],
 * Z = [1/(ρW − ρA)]·(1 − ρA/ρB). Water density from Tanaka (2001) air-free, air density CIPM-2007.
 * Validity: water 0–40 °C (Tanaka); the conditions-based Z uses CIPM-2007 without its range check
 * only when `unchecked` is set, otherwise 15–27 °C.
 * Units: densities g/mL, masses g, volumes mL, Z in mL/g (= µL/mg), γ in K⁻¹.
 */
import { type Dec, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';
import { airDensityCIPM2007, airDensityCIPM2007Unchecked } from './air-density.ts';
import { waterDensityTanaka } from './water-density.ts';

/** Z = (1/(ρW − ρA))·(1 − ρA/ρB), mL/g, densities in g/mL. */
export function zFactorFromDensities(p: { waterDensity: DecInput; airDensity: DecInput; weightDensity?: DecInput }): Dec {
  const rw = toDec(p.waterDensity, 'water density');
  const ra = toDec(p.airDensity, 'air density');
  const rb = toDec(p.weightDensity ?? '8.0', 'weight density');
  if (rw.lte(0) || ra.lte(0) || rb.lte(0)) throw new CalcError('non_positive', 'Densities must be greater than 0 g/mL');
  if (ra.gte(rw)) throw new CalcError('calc_out_of_range', 'Air density must be smaller than the water density (both in g/mL)');
  return c('1').div(rw.minus(ra)).mul(c('1').minus(ra.div(rb)));
}

/** ISO 8655-6 Z from water temperature (= air temperature), pressure and humidity. */
export function zFactor(p: {
  temperatureC: DecInput;
  pressurePa: DecInput;
  relativeHumidity: DecInput;
  xCO2?: DecInput;
  weightDensity?: DecInput;
  unchecked?: boolean;
}): Dec {
  const cond = { temperatureC: p.temperatureC, pressurePa: p.pressurePa, relativeHumidity: p.relativeHumidity, xCO2: p.xCO2 };
  const air = (p.unchecked ? airDensityCIPM2007Unchecked(cond) : airDensityCIPM2007(cond)).density.div(1000);
  const water = waterDensityTanaka(p.temperatureC).div(1000);
  return zFactorFromDensities({ waterDensity: water, airDensity: air, weightDensity: p.weightDensity });
}

/** ISO 4787 V20 in mL from the net reading (g), water temperature, air density (g/mL) and γ (K⁻¹). */
export function volumeAt20C(p: {
  netReading: DecInput;
  waterTemperatureC: DecInput;
  airDensity: DecInput;
  expansionCoefficient: DecInput;
  weightDensity?: DecInput;
}): Dec {
  const m = toDec(p.netReading, 'net reading');
  const t = toDec(p.waterTemperatureC, 'water temperature');
  const g = toDec(p.expansionCoefficient, 'cubic expansion coefficient');
  const water = waterDensityTanaka(t).div(1000);
  const z = zFactorFromDensities({ waterDensity: water, airDensity: p.airDensity, weightDensity: p.weightDensity });
  return m.mul(z).mul(c('1').minus(g.mul(t.minus(20))));
}
