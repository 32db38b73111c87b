/**
 * Density of moist air.
 * Source: CIPM-2007 equation, Picard, Davis, Gläser, Fujii, Metrologia 45 (2008) 149–155
 * (R = 8.314 472 as frozen into the equation; relative uncertainty of the equation 22e-6).
 * Validity: 15–27 °C, 600–1100 hPa, relative humidity 0–100 %, xCO2 0–0.01 (checked variant).
 * Also OIML R111-1 (2004) Annex E approximation E.3-1 (p in hPa, hr in %, t in °C).
 * Units: inputs °C, Pa (CIPM) or hPa (E.3-1), humidity as a fraction (CIPM) or % (E.3-1);
 * results in kg/m³.
 */
import { D, type Dec, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';
import { propagate, type BudgetRow } from './uncertainty.ts';

const R = c('8.314472'); // J mol⁻¹ K⁻¹ (value defined in CIPM-2007)
const MV = c('18.01528e-3'); // kg/mol, water
const A = c('1.2378847e-5');
const B = c('-1.9121316e-2');
const C = c('33.93711047');
const DD = c('-6.3431645e3');
const ALPHA = c('1.00062');
const BETA = c('3.14e-8');
const GAMMA = c('5.6e-7');
const A0 = c('1.58123e-6');
const A1 = c('-2.9331e-8');
const A2 = c('1.1043e-10');
const B0 = c('5.707e-6');
const B1 = c('-2.051e-8');
const C0 = c('1.9898e-4');
const C1 = c('-2.376e-6');
const DZ = c('1.83e-11');
const EZ = c('-0.765e-8');
const T0 = c('273.15');

/** Conventional air density of OIML D28, kg/m³. */
export const CONVENTIONAL_AIR_DENSITY: Dec = c('1.2');
/** Relative standard uncertainty of the CIPM-2007 equation itself. */
export const CIPM2007_RELATIVE_UNCERTAINTY: Dec = c('22e-6');
export const DEFAULT_XCO2 = '0.0004';

export interface CipmInput {
  temperatureC: DecInput;
  pressurePa: DecInput;
  /** relative humidity as a fraction 0…1 */
  relativeHumidity: DecInput;
  /** CO2 mole fraction, default 0.0004 */
  xCO2?: DecInput;
}

export interface CipmSteps {
  /** thermodynamic temperature, K */
  T: Dec;
  /** saturation vapour pressure, Pa */
  psv: Dec;
  /** enhancement factor */
  f: Dec;
  /** mole fraction of water vapour */
  xv: Dec;
  /** compressibility factor */
  Z: Dec;
  /** molar mass of dry air, kg/mol */
  Ma: Dec;
}

export interface CipmResult {
  /** kg/m³ */
  density: Dec;
  steps: CipmSteps;
}

/** Saturation vapour pressure over water (CIPM-2007), Pa, T in K. */
export function saturationVapourPressure(temperatureK: DecInput): Dec {
  const T = toDec(temperatureK, 'temperature');
  return A.mul(T.pow(2)).plus(B.mul(T)).plus(C).plus(DD.div(T)).exp();
}

/** CIPM-2007 moist-air density without range checks (used for derivatives and out-of-range studies). */
export function airDensityCIPM2007Unchecked(input: CipmInput): CipmResult {
  const t = toDec(input.temperatureC, 'temperature');
  const p = toDec(input.pressurePa, 'pressure');
  const h = toDec(input.relativeHumidity, 'relative humidity');
  const x = toDec(input.xCO2 ?? DEFAULT_XCO2, 'CO2 mole fraction');
  const T = t.plus(T0);
  if (T.lte(0) || p.lte(0)) {
    throw new CalcError('non_positive', 'Absolute temperature and pressure must be greater than zero', {
      details: { input: T.lte(0) ? 'temperatureC' : 'pressurePa' },
    });
  }
  const psv = saturationVapourPressure(T);
  const f = ALPHA.plus(BETA.mul(p)).plus(GAMMA.mul(t.pow(2)));
  const xv = h.mul(f).mul(psv).div(p);
  const Z = new D(1)
    .minus(
      p
        .div(T)
        .mul(
          A0.plus(A1.mul(t))
            .plus(A2.mul(t.pow(2)))
            .plus(B0.plus(B1.mul(t)).mul(xv))
            .plus(C0.plus(C1.mul(t)).mul(xv.pow(2))),
        ),
    )
    .plus(p.pow(2).div(T.pow(2)).mul(DZ.plus(EZ.mul(xv.pow(2)))));
  const Ma = c('28.96546').plus(c('12.011').mul(x.minus(c('0.0004')))).mul(c('1e-3'));
  const density = p
    .mul(Ma)
    .div(Z.mul(R).mul(T))
    .mul(new D(1).minus(xv.mul(new D(1).minus(MV.div(Ma)))));
  return { density, steps: { T, psv, f, xv, Z, Ma } };
}

function checkRange(name: string, v: Dec, lo: string, hi: string, message: string): void {
  if (v.lt(lo) || v.gt(hi)) {
    throw new CalcError('calc_out_of_range', message, { details: { input: name, value: v.toString(), min: lo, max: hi } });
  }
}

/** Throws CalcError('calc_out_of_range') when the input is outside the CIPM-2007 validity range. */
export function checkCIPM2007Range(input: CipmInput): void {
  const t = toDec(input.temperatureC, 'temperature');
  const p = toDec(input.pressurePa, 'pressure');
  const h = toDec(input.relativeHumidity, 'relative humidity');
  const x = toDec(input.xCO2 ?? DEFAULT_XCO2, 'CO2 mole fraction');
  checkRange('temperatureC', t, '15', '27', `Temperature ${t.toString()} °C is outside the CIPM-2007 range 15–27 °C`);
  checkRange(
    'pressurePa',
    p,
    '60000',
    '110000',
    `Pressure ${p.div(100).toString()} hPa is outside the CIPM-2007 range 600–1100 hPa`,
  );
  checkRange(
    'relativeHumidity',
    h,
    '0',
    '1',
    `Relative humidity ${h.mul(100).toString()} % is outside the range 0–100 %`,
  );
  checkRange('xCO2', x, '0', '0.01', `CO2 mole fraction ${x.toString()} is outside the range 0–0.01`);
}

/** CIPM-2007 moist-air density, kg/m³, with the validity range enforced. */
export function airDensityCIPM2007(input: CipmInput): CipmResult {
  checkCIPM2007Range(input);
  return airDensityCIPM2007Unchecked(input);
}

/**
 * OIML R111-1 Annex E, E.3-1: ρa = [0.348 48·p − 0.009·hr·exp(0.061·t)] / (273.15 + t), kg/m³.
 * Stated relative uncertainty about 2e-4 for 900–1100 hPa, 10–30 °C, hr < 80 %.
 */
export function airDensityOIML_E3(input: { temperatureC: DecInput; pressureHPa: DecInput; relativeHumidityPct: DecInput }): Dec {
  const t = toDec(input.temperatureC, 'temperature');
  const p = toDec(input.pressureHPa, 'pressure');
  const hr = toDec(input.relativeHumidityPct, 'relative humidity');
  if (p.lte(0)) throw new CalcError('non_positive', `Pressure must be greater than 0 hPa (got ${p.toString()})`, { details: { input: 'pressureHPa' } });
  checkRange('relativeHumidityPct', hr, '0', '100', `Relative humidity ${hr.toString()} % is outside the range 0–100 %`);
  const T = t.plus(T0);
  if (T.lte(0)) throw new CalcError('non_positive', 'Absolute temperature must be greater than zero', { details: { input: 'temperatureC' } });
  return c('0.34848').mul(p).minus(c('0.009').mul(hr).mul(c('0.061').mul(t).exp())).div(T);
}

export interface AirDensityUncertaintyInput extends CipmInput {
  /** standard uncertainties; defaults u(t) 0.2 K, u(p) 50 Pa, u(h) 0.03, u(xCO2) 0.0001 */
  uncertainties?: {
    temperatureC?: DecInput;
    pressurePa?: DecInput;
    relativeHumidity?: DecInput;
    xCO2?: DecInput;
  };
}

export interface AirDensityUncertaintyResult {
  /** kg/m³ */
  density: Dec;
  /** kg/m³ */
  standardUncertainty: Dec;
  budget: BudgetRow[];
}

/**
 * u(ρa) by GUM propagation through the CIPM-2007 function, including the equation's own
 * relative uncertainty (22e-6) as a multiplicative factor 1 ± 22e-6. Range-checked at the input point.
 */
export function airDensityUncertainty(input: AirDensityUncertaintyInput): AirDensityUncertaintyResult {
  checkCIPM2007Range(input);
  const u = input.uncertainties ?? {};
  const res = propagate({
    model: (x) =>
      airDensityCIPM2007Unchecked({
        temperatureC: x.temperatureC,
        pressurePa: x.pressurePa,
        relativeHumidity: x.relativeHumidity,
        xCO2: x.xCO2,
      }).density.mul(x.formula),
    inputs: {
      temperatureC: { value: input.temperatureC, standardUncertainty: u.temperatureC ?? '0.2', label: 'Air temperature', unit: '°C' },
      pressurePa: { value: input.pressurePa, standardUncertainty: u.pressurePa ?? '50', label: 'Air pressure', unit: 'Pa' },
      relativeHumidity: {
        value: input.relativeHumidity,
        standardUncertainty: u.relativeHumidity ?? '0.03',
        label: 'Relative humidity',
        unit: '1',
      },
      xCO2: { value: input.xCO2 ?? DEFAULT_XCO2, standardUncertainty: u.xCO2 ?? '0.0001', label: 'CO2 mole fraction', unit: '1' },
      formula: { value: '1', standardUncertainty: CIPM2007_RELATIVE_UNCERTAINTY, label: 'CIPM-2007 equation', unit: '1' },
    },
  });
  return { density: res.value, standardUncertainty: res.standardUncertainty, budget: res.budget };
}
