/**
 * Request schema of POST /api/calc/preparation (and the client live preview).
 * Every number is a decimal string exactly as typed; units are checked against the core's unit table
 * (aliases such as "ug" or "uL" are accepted). Cross-field rules that need arithmetic (purity ≤ 1,
 * CIPM-2007 range, densities) are enforced by calculatePreparation, which throws CalcError with the
 * same dotted field paths.
 */
import { z } from 'zod';
import { lineText } from './text.ts';
import Decimal from 'decimal.js';
import {
  DECIMAL_STRING_RE,
  CONCENTRATION_UNITS,
  DENSITY_UNITS,
  MASS_UNITS,
  VOLUME_UNITS,
  isConcentrationUnit,
  isDensityUnit,
  isMassUnit,
  isVolumeUnit,
} from '../calc/index.ts';
import { PLAUSIBLE, checkConcentration, checkQuantity, inRange, type Range } from './plausible.ts';
import type { PreparationRequest, CalcPreparationResponse } from '../calc/preparation.ts';

export type { CalcPreparationResponse };

const decimalString = (what: string) =>
  z
    .string({ error: `Enter ${what} as a number, e.g. 100.0` })
    .trim()
    .min(1, `Enter ${what}`)
    .regex(DECIMAL_STRING_RE, `Enter ${what} as a decimal number such as 100.0 or 1.5e-3 (use a point, not a comma)`);

/** The text as a Decimal when it is valid decimal text (zod 4 runs refinements after a failed regex). */
const asDecimal = (s: string): Decimal | null => (DECIMAL_STRING_RE.test(s) ? new Decimal(s) : null);

const positiveDecimal = (what: string) =>
  decimalString(what).refine((s) => asDecimal(s)?.gt(0) ?? true, `${what.charAt(0).toUpperCase() + what.slice(1)} must be greater than 0`);

const nonNegativeDecimal = (what: string) =>
  decimalString(what).refine((s) => !(asDecimal(s)?.isNeg() ?? false), `${what.charAt(0).toUpperCase() + what.slice(1)} must not be negative`);

const unitString = (check: (u: string) => boolean, allowed: readonly string[], what: string) =>
  z
    .string({ error: `Choose a unit for ${what}` })
    .trim()
    .refine(check, `Use one of ${allowed.join(', ')} for ${what}`);

const massUnit = (what: string) => unitString(isMassUnit, MASS_UNITS, what);
const densityUnit = (what: string) => unitString(isDensityUnit, DENSITY_UNITS, what);

const densityQuantity = (what: string) => z.object({ value: positiveDecimal(what), unit: densityUnit(what) });
/** A density within its plausible range (shared/schemas/plausible.ts states each range and its reason). */
const plausibleDensity = (what: string, r: Range) => densityQuantity(what).superRefine(checkQuantity('density', r, what));

const puritySchema = z
  .object({
    value: positiveDecimal('the purity')
      .refine((s) => asDecimal(s)?.lte(1) ?? true, 'Purity is a mass fraction: 0 < P ≤ 1 (e.g. 0.9995)')
      .superRefine(inRange(PLAUSIBLE.purity, 'the purity')),
    standardUncertainty: nonNegativeDecimal('the purity standard uncertainty').superRefine(inRange(PLAUSIBLE.purityUncertainty, 'the purity standard uncertainty')).optional(),
    expandedUncertainty: nonNegativeDecimal('the purity expanded uncertainty').superRefine(inRange(PLAUSIBLE.purityUncertainty, 'the purity expanded uncertainty')).optional(),
    k: positiveDecimal('the coverage factor k').superRefine(inRange(PLAUSIBLE.coverageFactor, 'the coverage factor k')).optional(),
    /** rectangular half-width, e.g. 0.0005 for "≥ 99.9 %" taken as 0.9995 ± 0.0005 */
    halfWidth: nonNegativeDecimal('the purity half-width').superRefine(inRange(PLAUSIBLE.purityUncertainty, 'the purity half-width')).optional(),
  })
  .superRefine((p, ctx) => {
    const given = [p.standardUncertainty, p.expandedUncertainty, p.halfWidth].filter((x) => x !== undefined).length;
    if (given > 1) {
      ctx.addIssue({ code: 'custom', path: ['standardUncertainty'], message: 'Give one purity uncertainty: standard, expanded with k, or a half-width' });
    }
    if (p.expandedUncertainty !== undefined && p.k === undefined) {
      ctx.addIssue({ code: 'custom', path: ['k'], message: 'Give the coverage factor k of the expanded uncertainty' });
    }
  });

const airSchema = z
  .object({
    temperatureC: decimalString('the air temperature in °C').optional(),
    pressureHPa: positiveDecimal('the air pressure in hPa').optional(),
    relativeHumidityPct: decimalString('the relative humidity in %')
      .refine((s) => { const d = asDecimal(s); return d === null || (!d.isNeg() && d.lte(100)); }, 'Relative humidity must be from 0 to 100 %')
      .optional(),
    co2MoleFraction: decimalString('the CO2 mole fraction')
      .refine((s) => { const d = asDecimal(s); return d === null || (!d.isNeg() && d.lte('0.01')); }, 'CO2 mole fraction must be from 0 to 0.01 (0.0004 = 400 ppm)')
      .optional(),
    density: plausibleDensity('the air density', PLAUSIBLE.airDensity).optional(),
  })
  .superRefine((a, ctx) => {
    const cond = { temperatureC: a.temperatureC, pressureHPa: a.pressureHPa, relativeHumidityPct: a.relativeHumidityPct };
    const anyCond = Object.values(cond).some((v) => v !== undefined);
    if (a.density !== undefined) {
      if (anyCond) ctx.addIssue({ code: 'custom', path: ['density'], message: 'Give either the air conditions or an air density, not both' });
      return;
    }
    const names: Record<string, string> = {
      temperatureC: 'Enter the air temperature (°C), or give an air density',
      pressureHPa: 'Enter the air pressure (hPa), or give an air density',
      relativeHumidityPct: 'Enter the relative humidity (%), or give an air density',
    };
    for (const [k, v] of Object.entries(cond)) if (v === undefined) ctx.addIssue({ code: 'custom', path: [k], message: names[k] });
  });

/**
 * Monte Carlo options (JCGM 101): trials 1,000…1,000,000 (default 10⁵), seed 0…4294967295 (default 1), as typed.
 * Used by the stateless endpoint and by a record's "Run Monte Carlo" action.
 */
export const monteCarloOptionsSchema = z.object({
  trials: z
    .string({ error: 'Enter the number of trials, e.g. 100000' })
    .trim()
    .regex(/^\d+$/, 'Trials must be a whole number from 1000 to 1000000 (default 100000)')
    .refine((s) => !/^\d+$/.test(s) || (Number(s) >= 1000 && Number(s) <= 1_000_000), 'Trials must be a whole number from 1000 to 1000000 (default 100000)')
    .optional(),
  seed: z
    .string({ error: 'Enter the seed as a whole number, e.g. 1' })
    .trim()
    .regex(/^\d+$/, 'The seed must be a whole number from 0 to 4294967295')
    .refine((s) => !/^\d+$/.test(s) || Number(s) <= 4294967295, 'The seed must be a whole number from 0 to 4294967295')
    .optional(),
});
export type MonteCarloOptions = z.infer<typeof monteCarloOptionsSchema>;

/** Trials and seed as numbers with their defaults (10⁵, 1). */
export function monteCarloNumbers(o: MonteCarloOptions | undefined): { trials: number; seed: number } {
  return { trials: o?.trials ? Number(o.trials) : 100_000, seed: o?.seed ? Number(o.seed) : 1 };
}

export const calcPreparationRequestSchema = z.object({
  target: z
    .object({
      value: positiveDecimal('the target concentration'),
      unit: unitString(isConcentrationUnit, CONCENTRATION_UNITS, 'the target concentration'),
      /** needed only for mass-fraction targets (mg/kg, µg/g …) */
      solutionDensity: plausibleDensity('the solution density', PLAUSIBLE.solutionDensity).optional(),
    })
    .superRefine((t, ctx) => checkConcentration(t, ctx)),
  volume: z
    .object({
      value: positiveDecimal('the volume'),
      unit: unitString(isVolumeUnit, VOLUME_UNITS, 'the volume'),
      standardUncertainty: nonNegativeDecimal('the volume standard uncertainty').optional(),
    })
    .superRefine(checkQuantity('volume', PLAUSIBLE.volume, 'the volume'))
    .superRefine((v, ctx) => {
      // an uncertainty as large as the volume itself says nothing about it
      const u = asDecimal(v.standardUncertainty ?? ''), x = asDecimal(v.value);
      if (u && x && u.gte(x)) ctx.addIssue({ code: 'custom', path: ['standardUncertainty'], message: 'The volume standard uncertainty must be smaller than the volume' });
    }),
  material: z.object({
    formula: lineText().trim().max(200, 'Use at most 200 characters').optional(),
    analyteFormula: lineText().trim().max(200, 'Use at most 200 characters').optional(),
    purity: puritySchema,
    density: plausibleDensity('the material density', PLAUSIBLE.materialDensity),
    /** certificate atomic weights by element symbol, used instead of the standard atomic weight (shared/calc/preparation.ts) */
    atomicWeights: z
      .record(
        z.string().regex(/^[A-Z][a-z]?$/, 'Use an element symbol such as Pb'),
        z.object({
          value: positiveDecimal('the atomic weight'),
          standardUncertainty: nonNegativeDecimal('its standard uncertainty').optional(),
          expandedUncertainty: nonNegativeDecimal('its expanded uncertainty').optional(),
          k: positiveDecimal('the coverage factor k').optional(),
          source: lineText().trim().min(1, 'Name the certificate that states it').max(200, 'Use at most 200 characters'),
        }),
      )
      .optional(),
  }),
  balance: z
    .object({
      weightDensity: plausibleDensity('the weight density', PLAUSIBLE.weightDensity).optional(),
      standardUncertainty: z
        .object({ value: nonNegativeDecimal('the balance standard uncertainty'), unit: massUnit('the balance standard uncertainty') })
        .superRefine(checkQuantity('mass', PLAUSIBLE.balanceMass, 'the balance standard uncertainty'))
        .optional(),
      readability: z
        .object({ value: positiveDecimal('the balance readability'), unit: massUnit('the balance readability') })
        .superRefine(checkQuantity('mass', PLAUSIBLE.readability, 'the balance readability'))
        .optional(),
    })
    .optional(),
  air: airSchema,
  weighing: z
    .object({
      reading: z
        .object({ value: positiveDecimal('the balance reading'), unit: massUnit('the balance reading') })
        .superRefine(checkQuantity('mass', PLAUSIBLE.balanceMass, 'the balance reading')),
    })
    .optional(),
  rounding: z.enum(['half-even', 'half-up'], { error: 'Rounding must be half-even or half-up' }).optional(),
  monteCarlo: monteCarloOptionsSchema.optional(),
});

export type CalcPreparationRequest = z.infer<typeof calcPreparationRequestSchema>;

// The inferred request must be accepted by the core (compile-time check).
type _Assignable = CalcPreparationRequest extends PreparationRequest ? true : never;
const requestTypeCheck: _Assignable = true;
void requestTypeCheck;
