/**
 * The buoyancy factor table to post at a balance: for named samples from 0.7 to 22 g/mL, the factor
 * B = m/m' (true mass per balance reading) and its inverse 1/B (the reading to aim for per gram of true mass),
 * at one air density and one weight density. Built only from the core: air density by CIPM-2007
 * (air-density.ts airDensityCIPM2007, range enforced) and B = (1 − ρa/ρw)/(1 − ρa/ρ) (buoyancy.ts buoyancyFactor).
 * Sources: as in air-density.ts and buoyancy.ts; each row's density names its own source below.
 * Units: densities g/mL (= g/cm³); t °C, p hPa, RH %. Results are decimal strings at full precision, with a
 * display string rounded to 7 decimals (B differs from 1 by 10⁻⁵ to 10⁻³, so 7 decimals show it to 0.1 ppm).
 */
import { airDensityCIPM2007 } from './air-density.ts';
import { buoyancyFactor, REFERENCE_WEIGHT_DENSITY } from './buoyancy.ts';
import { D, type DecInput, c, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';
import { roundToDecimals, toPlainString } from './rounding.ts';

export const BUOYANCY_TABLE_VERSION = 'buoyancy-table-1';
export const BUOYANCY_TABLE_MIN_DENSITY = '0.7';
export const BUOYANCY_TABLE_MAX_DENSITY = '22';
export const BUOYANCY_TABLE_DECIMALS = 7;

export type BuoyancyRowGroup = 'solvent' | 'water' | 'salt' | 'metal';

export interface BuoyancyTableEntry {
  name: string;
  group: BuoyancyRowGroup;
  /** g/mL at about 20 °C (liquids) or the crystal/metal density (solids) */
  density: string;
  /** where the density comes from ("from memory" where it does) */
  source: string;
}

/**
 * The rows, lightest first. Buoyancy needs a density only to about ±5 % (METROLOGY §2.3), so handbook values do;
 * the statuses are those of METROLOGY §9 ([M] there = "from memory" here).
 */
export const BUOYANCY_TABLE_ENTRIES: readonly BuoyancyTableEntry[] = [
  { name: 'Acetonitrile', group: 'solvent', density: '0.7827', source: 'DIPPR-105 correlation at 20 °C (METROLOGY §9); 0.786 is often quoted (from memory)' },
  { name: 'Ethanol', group: 'solvent', density: '0.7893', source: 'CRC aqueous-solution table, 100 %, 20 °C (METROLOGY §9)' },
  { name: 'Methanol', group: 'solvent', density: '0.7914', source: 'CRC organic table, 20 °C (from memory; METROLOGY §9)' },
  { name: 'Water, 20 °C', group: 'water', density: '0.998207', source: 'Tanaka et al., Metrologia 38 (2001), air-free, 20 °C (shared/calc/water-density.ts)' },
  { name: 'Nitric acid 2 % (w/w)', group: 'solvent', density: '1.0091', source: 'CRC aqueous-solution table, 20 °C (METROLOGY §9)' },
  { name: 'Tris (tromethamine)', group: 'salt', density: '1.35', source: 'from memory (literature 1.32–1.35; METROLOGY §9)' },
  { name: 'Potassium hydrogen phthalate', group: 'salt', density: '1.636', source: 'from memory (METROLOGY §9)' },
  { name: 'Potassium chloride', group: 'salt', density: '1.988', source: 'from memory (METROLOGY §9)' },
  { name: 'Sodium chloride', group: 'salt', density: '2.165', source: 'public density database, 2165 kg/m³ (METROLOGY §9)' },
  { name: 'Copper(II) sulfate pentahydrate', group: 'salt', density: '2.286', source: 'from memory (METROLOGY §9)' },
  { name: 'Sodium carbonate, anhydrous', group: 'salt', density: '2.54', source: 'from memory (METROLOGY §9)' },
  { name: 'Lead(II) nitrate', group: 'salt', density: '4.53', source: 'from memory (METROLOGY §9)' },
  { name: 'Zinc', group: 'metal', density: '7.14', source: 'from memory (METROLOGY §9)' },
  { name: 'Iron', group: 'metal', density: '7.87', source: 'from memory (METROLOGY §9)' },
  { name: 'Stainless steel (weights)', group: 'metal', density: '8.0', source: 'OIML R111-1 / D28 reference density of weights, 8000 kg/m³' },
  { name: 'Cadmium', group: 'metal', density: '8.65', source: 'from memory (METROLOGY §9)' },
  { name: 'Copper', group: 'metal', density: '8.96', source: 'from memory (METROLOGY §9)' },
  { name: 'Lead', group: 'metal', density: '11.34', source: 'from memory (METROLOGY §9)' },
  { name: 'Gold', group: 'metal', density: '19.3', source: 'from memory' },
  { name: 'Platinum', group: 'metal', density: '21.45', source: 'from memory' },
];

export interface AirConditions {
  temperatureC: DecInput;
  pressureHPa: DecInput;
  relativeHumidityPct: DecInput;
}

/** CIPM-2007 air density in g/mL from t (°C), p (hPa), RH (%); 15–27 °C, 600–1100 hPa, 0–100 % (CalcError outside). */
export function tableAirDensity(air: AirConditions): string {
  const r = airDensityCIPM2007({
    temperatureC: air.temperatureC,
    pressurePa: toDec(air.pressureHPa, 'pressure').mul(100),
    relativeHumidity: toDec(air.relativeHumidityPct, 'relative humidity').div(100),
  });
  return toPlainString(r.density.div(1000));
}

export interface BuoyancyTableRow extends BuoyancyTableEntry {
  /** B = m/m', full precision */
  factor: string;
  /** B rounded to 7 decimals */
  factorDisplay: string;
  /** 1/B = m'/m: the reading to aim for per gram of true mass (g per g), full precision */
  readingPerGram: string;
  readingPerGramDisplay: string;
  /** (B − 1)·10⁶: what a reading is short of the true mass, ppm, 1 decimal */
  correctionPpm: string;
}

export interface BuoyancyTable {
  /** g/mL */
  airDensity: string;
  /** g/mL */
  weightDensity: string;
  rows: BuoyancyTableRow[];
  calcVersion: string;
}

/** The table at air density ρa and weight density ρw (both g/mL; ρw default 8.0). */
export function buoyancyTable(p: { airDensity: DecInput; weightDensity?: DecInput }, entries: readonly BuoyancyTableEntry[] = BUOYANCY_TABLE_ENTRIES): BuoyancyTable {
  const weightDensity = toDec(p.weightDensity ?? REFERENCE_WEIGHT_DENSITY, 'weight density');
  const airDensity = toDec(p.airDensity, 'air density');
  const lo = c(BUOYANCY_TABLE_MIN_DENSITY);
  const hi = c(BUOYANCY_TABLE_MAX_DENSITY);
  const rows = entries.map((e) => {
    const rho = new D(e.density);
    if (rho.lt(lo) || rho.gt(hi)) {
      throw new CalcError('calc_out_of_range', `${e.name}: ${e.density} g/mL is outside the table's range ${BUOYANCY_TABLE_MIN_DENSITY}–${BUOYANCY_TABLE_MAX_DENSITY} g/mL`, { details: { input: 'density' } });
    }
    const b = buoyancyFactor({ airDensity, sampleDensity: rho, weightDensity });
    const inv = c('1').div(b);
    return {
      ...e,
      factor: toPlainString(b),
      factorDisplay: roundToDecimals(b, BUOYANCY_TABLE_DECIMALS),
      readingPerGram: toPlainString(inv),
      readingPerGramDisplay: roundToDecimals(inv, BUOYANCY_TABLE_DECIMALS),
      correctionPpm: roundToDecimals(b.minus(1).mul('1e6'), 1),
    };
  });
  return { airDensity: toPlainString(airDensity), weightDensity: toPlainString(weightDensity), rows, calcVersion: BUOYANCY_TABLE_VERSION };
}
