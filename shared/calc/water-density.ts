/**
 * Density of water (SMOW, ITS-90).
 * Source: Tanaka, Girard, Davis, Peuto, Bignell, Metrologia 38 (2001) 301–309 (air-free, 101 325 Pa);
 * air-saturation correction Δρ = s0 + s1·t (s0 = −4.612e-3 kg/m³, s1 = 0.106e-3 kg m⁻³ °C⁻¹, 0–25 °C);
 * compressibility factor (k0 + k1·t + k2·t²)·(p − 101 325 Pa), k0 = 50.74e-11 Pa⁻¹,
 * k1 = −0.326e-11 Pa⁻¹ °C⁻¹, k2 = 0.00416e-11 Pa⁻¹ °C⁻².
 * Validity: 0–40 °C (air-saturation correction 0–25 °C).
 * Units: temperature °C, pressure Pa, result kg/m³.
 */
import { type Dec, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';

const A1 = c('-3.983035');
const A2 = c('301.797');
const A3 = c('522528.9');
const A4 = c('69.34881');
const A5 = c('999.974950');
const S0 = c('-4.612e-3');
const S1 = c('0.106e-3');
const K0 = c('50.74e-11');
const K1 = c('-0.326e-11');
const K2 = c('0.00416e-11');
const P_REF = c('101325');

export interface WaterDensityOptions {
  /** add the air-saturation correction (valid 0–25 °C) */
  airSaturated?: boolean;
  /** apply the compressibility correction to this absolute pressure, Pa */
  pressurePa?: DecInput;
}

/** Tanaka (2001) density of water at temperatureC, kg/m³ (air-free unless airSaturated). */
export function waterDensityTanaka(temperatureC: DecInput, opts: WaterDensityOptions = {}): Dec {
  const t = toDec(temperatureC, 'water temperature');
  if (t.lt(0) || t.gt(40)) {
    throw new CalcError('calc_out_of_range', `Water temperature ${t.toString()} °C is outside the Tanaka (2001) range 0–40 °C`, {
      details: { input: 'temperatureC', min: '0', max: '40' },
    });
  }
  let rho = A5.mul(c('1').minus(t.plus(A1).pow(2).mul(t.plus(A2)).div(A3.mul(t.plus(A4)))));
  if (opts.airSaturated) {
    if (t.gt(25)) {
      throw new CalcError(
        'calc_out_of_range',
        `Water temperature ${t.toString()} °C is outside the range 0–25 °C of the air-saturation correction; use air-free water`,
        { details: { input: 'temperatureC', min: '0', max: '25' } },
      );
    }
    rho = rho.plus(S0.plus(S1.mul(t)));
  }
  if (opts.pressurePa !== undefined) {
    const p = toDec(opts.pressurePa, 'pressure');
    if (p.lte(0)) throw new CalcError('non_positive', `Pressure must be greater than 0 Pa (got ${p.toString()})`, { details: { input: 'pressurePa' } });
    rho = rho.mul(c('1').plus(K0.plus(K1.mul(t)).plus(K2.mul(t.pow(2))).mul(p.minus(P_REF))));
  }
  return rho;
}
