/**
 * Gravimetric check of volumetric ware: replicate volumes at 20 °C, mean, systematic and random error,
 * expanded uncertainty and the verdict against the ware's maximum permissible error.
 * Source: ISO 4787 for glass (V20 = m'·Z·[1 − γ·(t − 20 °C)]), ISO 8655-6 for piston pipettes (V = m'·Z, no
 * vessel term), Z = [1/(ρW − ρA)]·(1 − ρA/ρB) (gravimetric-volume.ts); water density Tanaka 2001
 * (water-density.ts, air-free or air-saturated as stated); air density CIPM-2007 (air-density.ts);
 * uncertainty by the GUM law of propagation (JCGM 100, uncertainty.ts) on the model of the mean volume,
 * with the components ISO 8655-6 / ISO/TR 20461 list: repeatability s/√n, balance readability (net of two
 * readings, d/√6), balance calibration, water temperature, air density, weight density, γ, evaporation.
 * Limits: volume-tolerances.ts (ISO 1042, ISO 648, ISO 385, ISO 8655-2; from memory, marked there).
 * Decision rule: simple acceptance: the measured systematic error (and for piston pipettes the random
 * error) within the limit, a value exactly at the limit passes; the uncertainty is reported, not subtracted.
 * Defaults (common practice): u(t water) 0.2 K; u(ρB) 0.035 g/mL; k = 2.
 * Validity: water 0–40 °C (air-saturated 0–25 °C), air within CIPM-2007 (15–27 °C, 600–1100 hPa); n ≥ 2.
 * Units: readings in any mass unit; volumes out in the unit of the nominal volume.
 */
import { type Dec, c, toDec } from './decimal.ts';
import { CalcError, withField } from './errors.ts';
import { airDensityUncertainty } from './air-density.ts';
import { waterDensityTanaka } from './water-density.ts';
import { zFactorFromDensities } from './gravimetric-volume.ts';
import { propagate, rectangular } from './uncertainty.ts';
import { convertDensity, convertMass, convertVolume, isDensityUnit, isMassUnit, isVolumeUnit, normaliseUnit } from './units.ts';
import {
  CHECK_WARE_KINDS,
  CHECK_WARE_MATERIALS,
  EXPANSION_COEFFICIENTS,
  GLASS_TOLERANCE_TABLES,
  ISO_8655_2_PISTON_PIPETTES,
  type CheckWareKind,
  type CheckWareMaterial,
} from './volume-tolerances.ts';

/** Stored with every result so a stored check names the calculation that produced it. */
export const VOLUME_CHECK_CALC_VERSION = 'volume-check/1';

export interface QuantityText {
  value: string;
  unit: string;
}

export interface VolumeCheckRequest {
  ware: {
    kind: CheckWareKind;
    nominal: QuantityText;
    class: 'A' | 'B' | null;
    material: CheckWareMaterial;
    mode: 'delivery' | 'content';
    /** the volume set on a piston pipette (50 %, 10 % …); default the nominal volume */
    testedVolume?: QuantityText;
    /** the lab's own limits instead of the standard's table (e.g. no tabulated row), with their source */
    limits?: { systematic: QuantityText; random?: QuantityText; source: string };
  };
  /** net balance readings of the water, as shown */
  readings: QuantityText[];
  waterTemperatureC: string;
  /** Tanaka air-saturation correction (default false: air-free water) */
  waterAirSaturated?: boolean;
  air: { temperatureC?: string; pressureHPa?: string; relativeHumidityPct?: string; co2MoleFraction?: string; density?: QuantityText };
  balance?: { weightDensity?: QuantityText; readability?: QuantityText; standardUncertainty?: QuantityText };
  /** mass of water lost by evaporation during one replicate, added to each reading */
  evaporation?: QuantityText;
  /** standard uncertainty of the water temperature, K (default 0.2) */
  waterTemperatureStandardUncertainty?: string;
}

export interface VolumeCheckLimit {
  systematic: QuantityText;
  random: QuantityText | null;
  source: string;
  fromMemory: boolean;
}

export interface VolumeCheckResponse {
  calcVersion: string;
  method: 'ISO 4787' | 'ISO 8655-6';
  nominal: QuantityText;
  testedVolume: QuantityText;
  waterDensity: { value: string; unit: 'g/mL'; temperatureC: string; airSaturated: boolean; source: string };
  airDensity: { value: string; unit: 'g/mL'; standardUncertainty: string; method: 'CIPM-2007' | 'given' };
  weightDensity: { value: string; unit: 'g/mL' };
  zFactor: { value: string; unit: 'mL/g' };
  expansionCoefficient: { value: string; unit: '1/K'; source: string };
  evaporation: QuantityText | null;
  replicates: Array<{ index: number; reading: QuantityText; volume: QuantityText }>;
  n: string;
  mean: QuantityText;
  systematicError: { value: string; unit: string; percent: string };
  randomError: { standardDeviation: QuantityText; cvPercent: string };
  uncertainty: {
    standardUncertainty: string;
    expandedUncertainty: string;
    k: string;
    unit: string;
    budget: Array<{ input: string; label: string; unit?: string; value: string; standardUncertainty: string; sensitivity: string; contribution: string; share: string }>;
  };
  verdict: {
    result: 'pass' | 'fail';
    limit: VolumeCheckLimit;
    checks: Array<{ quantity: 'systematic' | 'random'; measured: string; limit: string; unit: string; pass: boolean }>;
    decisionRule: string;
  };
}

export const DECISION_RULE = 'Simple acceptance: pass when the measured error is within the maximum permissible error (a value at the limit passes); the uncertainty is reported, not subtracted';

const DEFAULT_WEIGHT_DENSITY = '8.0';
const WEIGHT_DENSITY_U = '0.035'; // g/mL [common practice, as preparation.ts]
const GIVEN_AIR_DENSITY_HALF_WIDTH = '0.06e-3'; // g/mL [common practice, as preparation.ts]
const DEFAULT_WATER_T_U = '0.2'; // K [common practice]
const K = '2';

function out(d: Dec): string {
  return d.toSignificantDigits(20).toFixed();
}

function num(x: string | undefined, field: string, label: string): Dec {
  if (x === undefined || x === null || x === '') throw new CalcError('missing_input', `Enter the ${label}`, { field });
  return withField(field, () => toDec(x, label));
}

function positive(x: string | undefined, field: string, label: string): Dec {
  const d = num(x, field, label);
  if (d.lte(0)) throw new CalcError('non_positive', `The ${label} must be greater than 0`, { field });
  return d;
}

function unit(u: string | undefined, field: string, check: (u: string) => boolean, label: string): string {
  if (!u || !check(u)) throw new CalcError('unknown_unit', `Choose a unit for the ${label}`, { field });
  return normaliseUnit(u);
}

function quantity(q: QuantityText | undefined, field: string, check: (u: string) => boolean, label: string, allowZero = false): { value: Dec; unit: string } {
  if (!q) throw new CalcError('missing_input', `Enter the ${label}`, { field });
  const v = allowZero ? num(q.value, `${field}.value`, label) : positive(q.value, `${field}.value`, label);
  if (v.isNeg()) throw new CalcError('non_positive', `The ${label} must not be negative`, { field: `${field}.value` });
  return { value: v, unit: unit(q.unit, `${field}.unit`, check, label) };
}

/** A limit in `to`: the table's text as written when no conversion is needed ("0.020" keeps its digits). */
function inUnit(value: string | Dec, from: string, to: string): string {
  if (typeof value === 'string' && normaliseUnit(from) === to) return value;
  return out(convertVolume(value, from, to));
}

/** The maximum permissible error the check is judged against, in the unit of the tested volume. */
export function limitFor(ware: VolumeCheckRequest['ware'], testedUnit: string): VolumeCheckLimit {
  if (ware.limits) {
    const sys = quantity(ware.limits.systematic, 'ware.limits.systematic', isVolumeUnit, 'systematic limit');
    const rnd = ware.limits.random ? quantity(ware.limits.random, 'ware.limits.random', isVolumeUnit, 'random limit') : null;
    return {
      systematic: { value: inUnit(ware.limits.systematic.value.trim(), sys.unit, testedUnit), unit: testedUnit },
      random: rnd && ware.limits.random ? { value: inUnit(ware.limits.random.value.trim(), rnd.unit, testedUnit), unit: testedUnit } : null,
      source: ware.limits.source,
      fromMemory: false,
    };
  }
  const nominal = quantity(ware.nominal, 'ware.nominal', isVolumeUnit, 'nominal volume');
  if (ware.kind === 'piston_pipette') {
    const t = ISO_8655_2_PISTON_PIPETTES;
    const ul = convertVolume(nominal.value, nominal.unit, 'µL');
    const row = t.rows.find((r) => c(r.nominal).eq(ul));
    if (!row) {
      throw new CalcError('calc_out_of_range', `${t.standard} has no row for ${out(ul)} µL; give the lab's limits (ware.limits) with their source`, { field: 'ware.nominal.value' });
    }
    return {
      systematic: { value: inUnit(row.systematic, 'µL', testedUnit), unit: testedUnit },
      random: { value: inUnit(row.random, 'µL', testedUnit), unit: testedUnit },
      source: `${t.standard}, ${row.nominal} µL row: ${t.source}`,
      fromMemory: t.fromMemory,
    };
  }
  const t = GLASS_TOLERANCE_TABLES[ware.kind];
  if (ware.class === null) {
    throw new CalcError('missing_input', `Ware without a class has no limit in ${t.standard}; give the class or the lab's limits (ware.limits)`, { field: 'ware.class' });
  }
  const ml = convertVolume(nominal.value, nominal.unit, 'mL');
  const key = Object.keys(t.classA).find((k) => c(k).eq(ml));
  if (!key) {
    throw new CalcError('calc_out_of_range', `${t.standard} has no row for ${out(ml)} mL; give the lab's limits (ware.limits) with their source`, { field: 'ware.nominal.value' });
  }
  const a = ware.class === 'B' ? c(t.classA[key]).mul(t.classBFactor) : t.classA[key];
  return {
    systematic: { value: inUnit(a, 'mL', testedUnit), unit: testedUnit },
    random: null,
    source: `${t.standard}, class ${ware.class}, ${key} mL: ${t.source}`,
    fromMemory: t.fromMemory,
  };
}

/** The verdict from the measured errors (same unit as the limit). Exactly at the limit passes. */
export function verdictFor(p: { systematicError: Dec; standardDeviation: Dec; limit: VolumeCheckLimit }): VolumeCheckResponse['verdict'] {
  const checks: VolumeCheckResponse['verdict']['checks'] = [];
  const sysLimit = c(p.limit.systematic.value);
  checks.push({ quantity: 'systematic', measured: out(p.systematicError), limit: p.limit.systematic.value, unit: p.limit.systematic.unit, pass: p.systematicError.abs().lte(sysLimit) });
  if (p.limit.random) {
    const rl = c(p.limit.random.value);
    checks.push({ quantity: 'random', measured: out(p.standardDeviation), limit: p.limit.random.value, unit: p.limit.random.unit, pass: p.standardDeviation.lte(rl) });
  }
  return { result: checks.every((x) => x.pass) ? 'pass' : 'fail', limit: p.limit, checks, decisionRule: DECISION_RULE };
}

export function calculateVolumeCheck(req: VolumeCheckRequest): VolumeCheckResponse {
  const ware = req.ware;
  if (!ware) throw new CalcError('missing_input', 'Describe the ware', { field: 'ware' });
  if (!CHECK_WARE_KINDS.includes(ware.kind)) throw new CalcError('missing_input', `Kind is one of ${CHECK_WARE_KINDS.join(', ')}`, { field: 'ware.kind' });
  if (!CHECK_WARE_MATERIALS.includes(ware.material)) throw new CalcError('missing_input', `Material is one of ${CHECK_WARE_MATERIALS.join(', ')}`, { field: 'ware.material' });
  if (ware.kind !== 'volumetric_flask' && ware.mode !== 'delivery') {
    throw new CalcError('calc_out_of_range', 'Pipettes and burettes are checked by what they deliver (mode "delivery")', { field: 'ware.mode' });
  }
  const piston = ware.kind === 'piston_pipette';
  const nominal = quantity(ware.nominal, 'ware.nominal', isVolumeUnit, 'nominal volume');
  const tested = ware.testedVolume ? quantity(ware.testedVolume, 'ware.testedVolume', isVolumeUnit, 'tested volume') : nominal;
  if (!piston && ware.testedVolume && !convertVolume(tested.value, tested.unit, nominal.unit).eq(nominal.value)) {
    throw new CalcError('calc_out_of_range', 'Glass ware is checked at its nominal volume', { field: 'ware.testedVolume.value' });
  }
  if (convertVolume(tested.value, tested.unit, nominal.unit).gt(nominal.value)) {
    throw new CalcError('calc_out_of_range', 'The tested volume cannot exceed the nominal volume', { field: 'ware.testedVolume.value' });
  }
  const vUnit = nominal.unit;
  const testedV = convertVolume(tested.value, tested.unit, vUnit);
  const limit = limitFor(ware, vUnit);

  if (!Array.isArray(req.readings) || req.readings.length < 2) {
    throw new CalcError('missing_input', 'Enter at least two readings (the random error needs n ≥ 2)', { field: 'readings' });
  }
  const massesG = req.readings.map((r, i) => {
    const q = quantity(r, `readings.${i}`, isMassUnit, `reading ${i + 1}`);
    return convertMass(q.value, q.unit, 'g');
  });

  const t = num(req.waterTemperatureC, 'waterTemperatureC', 'water temperature');
  const airSat = req.waterAirSaturated === true;
  const rhoWAt = (temp: Dec) => waterDensityTanaka(temp, { airSaturated: airSat }).div(1000);
  const rhoW = withField('waterTemperatureC', () => rhoWAt(t));
  const uT = req.waterTemperatureStandardUncertainty !== undefined ? num(req.waterTemperatureStandardUncertainty, 'waterTemperatureStandardUncertainty', 'water temperature uncertainty') : c(DEFAULT_WATER_T_U);

  // ---- air
  const air = req.air;
  if (!air) throw new CalcError('missing_input', 'Enter the air conditions or an air density', { field: 'air' });
  let rhoA: Dec;
  let rhoAU: Dec;
  let airMethod: 'CIPM-2007' | 'given';
  const hasConditions = [air.temperatureC, air.pressureHPa, air.relativeHumidityPct].some((v) => v !== undefined && v !== '');
  if (air.density) {
    if (hasConditions) throw new CalcError('calc_out_of_range', 'Give either the air conditions or an air density, not both', { field: 'air.density' });
    const d = quantity(air.density, 'air.density', isDensityUnit, 'air density');
    rhoA = convertDensity(d.value, d.unit, 'g/mL');
    rhoAU = rectangular(GIVEN_AIR_DENSITY_HALF_WIDTH);
    airMethod = 'given';
  } else {
    const at = num(air.temperatureC, 'air.temperatureC', 'air temperature');
    const ap = positive(air.pressureHPa, 'air.pressureHPa', 'air pressure');
    const ah = num(air.relativeHumidityPct, 'air.relativeHumidityPct', 'relative humidity');
    const x = air.co2MoleFraction ? num(air.co2MoleFraction, 'air.co2MoleFraction', 'CO2 mole fraction') : undefined;
    let r;
    try {
      r = airDensityUncertainty({ temperatureC: at, pressurePa: ap.mul(100), relativeHumidity: ah.div(100), ...(x ? { xCO2: x } : {}) });
    } catch (e) {
      if (e instanceof CalcError && e.field === undefined) {
        const input = String(e.details?.input ?? 'temperatureC');
        e.field = ({ temperatureC: 'air.temperatureC', pressurePa: 'air.pressureHPa', relativeHumidity: 'air.relativeHumidityPct', xCO2: 'air.co2MoleFraction' } as Record<string, string>)[input] ?? 'air';
      }
      throw e;
    }
    rhoA = r.density.div(1000);
    rhoAU = r.standardUncertainty.div(1000);
    airMethod = 'CIPM-2007';
  }

  // ---- balance
  const wd = req.balance?.weightDensity ? quantity(req.balance.weightDensity, 'balance.weightDensity', isDensityUnit, 'weight density') : { value: c(DEFAULT_WEIGHT_DENSITY), unit: 'g/mL' };
  const rhoB = convertDensity(wd.value, wd.unit, 'g/mL');
  const readability = req.balance?.readability ? quantity(req.balance.readability, 'balance.readability', isMassUnit, 'balance readability') : null;
  const balanceU = req.balance?.standardUncertainty ? quantity(req.balance.standardUncertainty, 'balance.standardUncertainty', isMassUnit, 'balance standard uncertainty', true) : null;
  const evap = req.evaporation ? quantity(req.evaporation, 'evaporation', isMassUnit, 'evaporation loss', true) : null;
  const evapG = evap ? convertMass(evap.value, evap.unit, 'g') : c('0');

  // ---- vessel expansion (ISO 4787); ISO 8655-6 applies none
  const exp = EXPANSION_COEFFICIENTS[ware.material];
  const gamma = piston ? c('0') : c(exp.value);
  const gammaHalf = piston ? c('0') : c(exp.halfWidth);
  const expansionSource = piston ? 'none: ISO 8655-6 computes V = m·Z without a vessel term' : exp.source;

  const z = withField('waterTemperatureC', () => zFactorFromDensities({ waterDensity: rhoW, airDensity: rhoA, weightDensity: rhoB }));
  const vesselFactor = (g: Dec, temp: Dec) => c('1').minus(g.mul(temp.minus(20)));
  const mlToUnit = (v: Dec) => convertVolume(v, 'mL', vUnit);

  const volumes = massesG.map((m) => mlToUnit(m.plus(evapG).mul(z).mul(vesselFactor(gamma, t))));
  const n = c(String(volumes.length));
  const mean = volumes.reduce((a, b) => a.plus(b), c('0')).div(n);
  const sd = volumes.reduce((a, v) => a.plus(v.minus(mean).pow(2)), c('0')).div(n.minus(1)).sqrt();
  const es = mean.minus(testedV);
  const meanMass = massesG.reduce((a, b) => a.plus(b), c('0')).div(n);

  // ---- uncertainty of the mean volume (GUM, numerical sensitivities)
  const gOf = (q: { value: Dec; unit: string }) => convertMass(q.value, q.unit, 'g');
  const res = propagate({
    model: (x) => {
      const w = waterDensityTanaka(x.waterTemperatureC, { airSaturated: airSat }).div(1000);
      const zz = zFactorFromDensities({ waterDensity: w, airDensity: x.airDensity, weightDensity: x.weightDensity });
      const m = meanMass.plus(x.evaporation).plus(x.readability).plus(x.balanceCalibration);
      return mlToUnit(m.mul(zz).mul(vesselFactor(x.expansionCoefficient, x.waterTemperatureC))).plus(x.repeatability);
    },
    inputs: {
      repeatability: { value: '0', standardUncertainty: sd.div(n.sqrt()), label: 'Repeatability of the mean (s/√n)', unit: vUnit },
      readability: { value: '0', standardUncertainty: readability ? gOf(readability).div(c('6').sqrt()) : '0', label: 'Balance readability (net of two readings, d/√6)', unit: 'g' },
      balanceCalibration: { value: '0', standardUncertainty: balanceU ? gOf(balanceU) : '0', label: 'Balance calibration', unit: 'g' },
      waterTemperatureC: { value: t, standardUncertainty: uT, label: 'Water temperature', unit: '°C' },
      airDensity: { value: rhoA, standardUncertainty: rhoAU, label: airMethod === 'given' ? 'Air density (given)' : 'Air density (CIPM-2007)', unit: 'g/mL' },
      weightDensity: { value: rhoB, standardUncertainty: WEIGHT_DENSITY_U, label: 'Density of the balance weights', unit: 'g/mL' },
      expansionCoefficient: { value: gamma, standardUncertainty: rectangular(gammaHalf), label: 'Cubic expansion coefficient of the ware', unit: '1/K' },
      evaporation: { value: evapG, standardUncertainty: rectangular(evapG), label: 'Evaporation loss per replicate', unit: 'g' },
    },
  });
  const U = res.standardUncertainty.mul(K);

  const verdict = verdictFor({ systematicError: es, standardDeviation: sd, limit });

  return {
    calcVersion: VOLUME_CHECK_CALC_VERSION,
    method: piston ? 'ISO 8655-6' : 'ISO 4787',
    nominal: { value: ware.nominal.value.trim(), unit: vUnit },
    testedVolume: { value: out(testedV), unit: vUnit },
    waterDensity: { value: out(rhoW), unit: 'g/mL', temperatureC: t.toFixed(), airSaturated: airSat, source: `Tanaka et al. 2001, ${airSat ? 'air-saturated' : 'air-free'} water` },
    airDensity: { value: out(rhoA), unit: 'g/mL', standardUncertainty: out(rhoAU), method: airMethod },
    weightDensity: { value: out(rhoB), unit: 'g/mL' },
    zFactor: { value: out(z), unit: 'mL/g' },
    expansionCoefficient: { value: out(gamma), unit: '1/K', source: expansionSource },
    evaporation: evap ? { value: out(evap.value), unit: evap.unit } : null,
    replicates: volumes.map((v, i) => ({ index: i + 1, reading: { value: req.readings[i].value.trim(), unit: normaliseUnit(req.readings[i].unit) }, volume: { value: out(v), unit: vUnit } })),
    n: n.toFixed(),
    mean: { value: out(mean), unit: vUnit },
    systematicError: { value: out(es), unit: vUnit, percent: out(es.div(testedV).mul(100)) },
    randomError: { standardDeviation: { value: out(sd), unit: vUnit }, cvPercent: out(sd.div(mean).mul(100)) },
    uncertainty: {
      standardUncertainty: out(res.standardUncertainty),
      expandedUncertainty: out(U),
      k: K,
      unit: vUnit,
      budget: res.budget.map((b) => ({
        input: b.input,
        label: b.label,
        ...(b.unit !== undefined ? { unit: b.unit } : {}),
        value: out(b.value),
        standardUncertainty: out(b.standardUncertainty),
        sensitivity: out(b.sensitivity),
        contribution: out(b.contribution),
        share: out(b.share),
      })),
    },
    verdict,
  };
}
