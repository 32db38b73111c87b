/**
 * Air-buoyancy correction of weighings and conventional mass.
 * Source: B = (1 − ρa/ρw)/(1 − ρa/ρ) as in NIST SOP 2 / NISTIR 6969; conventional mass per
 * OIML D28 (2004) with ρ0 = 1.2 kg/m³ and reference density 8000 kg/m³.
 * Validity: any positive densities with ρa < ρ and ρa < ρw (balance adjusted with weights of ρw).
 * Units: all densities in g/mL (= g/cm³); masses in any one unit, returned in the same unit.
 */
import { type Dec, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';

/** Reference weight density of conventional mass, g/mL (8000 kg/m³). */
export const REFERENCE_WEIGHT_DENSITY: Dec = c('8.0');
/** Conventional air density ρ0, g/mL (1.2 kg/m³). */
export const CONVENTIONAL_AIR_DENSITY_G_PER_ML: Dec = c('0.0012');

export interface BuoyancyParams {
  /** g/mL */
  airDensity: DecInput;
  /** density of the object weighed, g/mL */
  sampleDensity: DecInput;
  /** density of the balance's adjustment weights, g/mL; default 8.0 */
  weightDensity?: DecInput;
}

function positive(x: DecInput, name: string, input: string): Dec {
  const d = toDec(x, name);
  if (d.lte(0)) {
    throw new CalcError('non_positive', `${name} must be greater than 0 g/mL (got ${d.toString()})`, { details: { input } });
  }
  return d;
}

/** B = m/m' = (1 − ρa/ρw)/(1 − ρa/ρ). */
export function buoyancyFactor(p: BuoyancyParams): Dec {
  const rhoA = positive(p.airDensity, 'Air density', 'airDensity');
  const rho = positive(p.sampleDensity, 'Sample density', 'sampleDensity');
  const rhoW = positive(p.weightDensity ?? REFERENCE_WEIGHT_DENSITY, 'Weight density', 'weightDensity');
  if (rhoA.gte(rho)) {
    throw new CalcError(
      'calc_out_of_range',
      `Air density ${rhoA.toString()} g/mL must be smaller than the sample density ${rho.toString()} g/mL (densities are in g/mL, e.g. air 0.0012)`,
      { details: { input: 'sampleDensity' } },
    );
  }
  if (rhoA.gte(rhoW)) {
    throw new CalcError(
      'calc_out_of_range',
      `Air density ${rhoA.toString()} g/mL must be smaller than the weight density ${rhoW.toString()} g/mL`,
      { details: { input: 'weightDensity' } },
    );
  }
  return c('1').minus(rhoA.div(rhoW)).div(c('1').minus(rhoA.div(rho)));
}

/** True mass m = B·m' from a balance reading m' (same unit as the reading). */
export function trueMassFromReading(reading: DecInput, p: BuoyancyParams): Dec {
  return toDec(reading, 'reading').mul(buoyancyFactor(p));
}

/** Balance reading m' = m/B that corresponds to a true mass m (planning inverse). */
export function readingForTrueMass(trueMass: DecInput, p: BuoyancyParams): Dec {
  return toDec(trueMass, 'true mass').div(buoyancyFactor(p));
}

/** OIML D28 conventional mass mc = m·(1 − ρ0/ρ)/(1 − ρ0/8000 kg/m³); ρ in g/mL. */
export function conventionalMass(trueMass: DecInput, density: DecInput): Dec {
  const m = toDec(trueMass, 'true mass');
  const rho = positive(density, 'Density', 'density');
  if (rho.lte(CONVENTIONAL_AIR_DENSITY_G_PER_ML)) {
    throw new CalcError('calc_out_of_range', `Density ${rho.toString()} g/mL must be greater than the reference air density 0.0012 g/mL`, {
      details: { input: 'density' },
    });
  }
  return m
    .mul(c('1').minus(CONVENTIONAL_AIR_DENSITY_G_PER_ML.div(rho)))
    .div(c('1').minus(CONVENTIONAL_AIR_DENSITY_G_PER_ML.div(REFERENCE_WEIGHT_DENSITY)));
}
