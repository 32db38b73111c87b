/**
 * Gravimetric dilutions (METROLOGY §5.5): weigh an aliquot of a verified parent and the final solution on one
 * balance; each net reading is corrected for air buoyancy (B = (1 − ρa/ρw)/(1 − ρa/ρ), METROLOGY §2.1, air density
 * by CIPM-2007 §1.1) and the result is a mass fraction w2 = w1·m_aliquot/m_final (mg/kg) and, with the final
 * solution's density, a mass concentration γ2 = w2·ρ_final (mg/L).
 *   POST /api/preparations/:key/gravimetric-dilutions   (key = the parent)   GravimetricPlanInput → detail (201)
 *   POST /api/preparations/:key/gravimetric-readings    (key = the dilution) GravimetricReadingsInput → detail (201)
 * Decimal strings throughout; readings keep the digits the balance showed.
 */
import { z } from 'zod';
import { capturesSchema, splitCapturedReadings, type StoredCapture } from '../balance/capture.ts';
import { PLAUSIBLE, inRange } from './plausible.ts';
import { multilineText } from './text.ts';
import Decimal from 'decimal.js';
import { DECIMAL_TEXT } from './decimal-text.ts';
import type { DilutionResult } from '../calc/dilution.ts';
import type { Balance } from './inventory.ts';
import type { ConditionsUsed, Gate } from './preparations.ts';
import type { ParentSnapshot } from './lineage.ts';

const decimal = (what: string, test: (d: Decimal) => boolean, rangeMessage: string) =>
  z
    .string({ error: `Enter ${what} as a number, e.g. 1.0` })
    .trim()
    .min(1, `Enter ${what}`)
    .regex(DECIMAL_TEXT, { error: `Enter ${what} as a decimal number (use a point, not a comma)`, abort: true })
    .refine((s) => DECIMAL_TEXT.test(s) && test(new Decimal(s)), rangeMessage);

const positive = (what: string) => decimal(what, (d) => d.gt(0), `${what.charAt(0).toUpperCase() + what.slice(1)} must be greater than 0`);
/** solution densities a laboratory meets (g/mL); outside this an entry is almost certainly a unit slip (kg/m³) */
const density = (what: string) => decimal(what, (d) => d.gte('0.5') && d.lte('2.5'), `Enter ${what} in g/mL, between 0.5 and 2.5 (water is about 0.998)`);
const id = (what: string) => z.number({ error: `Choose ${what}` }).int(`Choose ${what}`).positive(`Choose ${what}`);
const reason = (what: string) => multilineText({ error: `Give ${what}` }).trim().min(3, `Give ${what} (at least 3 characters)`).max(500, 'Use at most 500 characters');
/** a balance reading exactly as shown: plain digits and a point (a minus sign if the display shows one), never an exponent */
const reading = (what: string) =>
  z
    .string({ error: `Enter ${what} as the balance shows it, e.g. 1.0234` })
    .trim()
    .min(1, `Enter ${what}`)
    .regex(/^-?\d+(\.\d+)?$/, { error: `Enter ${what} as the balance shows it, digits and a point, e.g. 1.0234` }); // sign and size: checkReadingRange on the server (422)

/** Body of POST /api/preparations/:key/gravimetric-dilutions (key = a verified, in-date parent). */
export const gravimetricPlanInputSchema = z.object({
  target: z.object({
    value: positive('the target mass fraction').superRefine(inRange(PLAUSIBLE.massFraction, 'the target mass fraction')),
    unit: z.literal('mg/kg', { error: 'Give the target of a gravimetric dilution in mg/kg' }),
  }),
  balanceId: id('a balance'),
  /** true mass of the final solution to make, g */
  plannedFinalMassG: positive('the planned final mass').superRefine(inRange(PLAUSIBLE.finalMass, 'the planned final mass')),
  /** density of the parent solution, g/mL (default: water at the parent's make-up temperature, see GRAVIMETRIC_DENSITY_DEFAULT) */
  parentDensity: density('the parent solution density').optional(),
  /** density of the final solution, g/mL (default: water at the room temperature) */
  finalDensity: density('the final solution density').optional(),
  solventId: id('the solvent').optional(),
  notes: multilineText().trim().max(2000, 'Use at most 2000 characters').optional(),
});
export type GravimetricPlanInput = z.output<typeof gravimetricPlanInputSchema>;

/** Room conditions of the readings (CIPM-2007 range: 15–27 °C, 600–1100 hPa, 0–100 %). Omit for the lab's defaults. */
export const gravimetricRoomSchema = z.object({
  temperatureC: decimal('the air temperature', (d) => d.gte(15) && d.lte(27), 'Enter an air temperature between 15 and 27 °C (the range of the CIPM-2007 air-density equation)'),
  pressureHPa: decimal('the air pressure', (d) => d.gte(600) && d.lte(1100), 'Enter an air pressure between 600 and 1100 hPa'),
  humidityPct: decimal('the relative humidity', (d) => d.gte(0) && d.lte(100), 'Enter a relative humidity between 0 and 100 %'),
});

/** Body of POST /api/preparations/:key/gravimetric-readings: both net readings, as the balance showed them. */
export const GRAVIMETRIC_READING_FIELDS = ['aliquotReading', 'finalReading'] as const;

export const gravimetricReadingsInputSchema = z.preprocess(
  splitCapturedReadings(GRAVIMETRIC_READING_FIELDS),
  z
  .object({
    /** how each reading came in (a reading sent as { value, unit, capture } lands here; absent: typed, flagged) */
    captures: capturesSchema(GRAVIMETRIC_READING_FIELDS),
    aliquotReading: reading('the aliquot reading'),
    finalReading: reading('the final solution reading'),
    unit: z.enum(['g', 'mg'], { error: 'Give the unit the balance showed: g or mg' }).default('g'),
    room: gravimetricRoomSchema.optional(),
    supersedesId: id('the readings to correct').optional(),
    correctionReason: reason('the reason for the correction').optional(),
  })
  .superRefine((v, ctx) => {
    if (DECIMAL_TEXT.test(v.aliquotReading) && DECIMAL_TEXT.test(v.finalReading) && new Decimal(v.aliquotReading).gt(0) && new Decimal(v.aliquotReading).gte(v.finalReading)) {
      ctx.addIssue({ code: 'custom', path: ['finalReading'], message: 'The final solution (aliquot + diluent) must weigh more than the aliquot' });
    }
    if (v.supersedesId !== undefined && !v.correctionReason) ctx.addIssue({ code: 'custom', path: ['correctionReason'], message: 'Give the reason for the correction' });
  }),
);
export type GravimetricReadingsInput = z.output<typeof gravimetricReadingsInputSchema>;

// ---------------------------------------------------------------- DTOs

/** A value with its standard uncertainty and where both come from. */
export interface SourcedValue {
  value: string;
  standardUncertainty: string;
  basis: string;
}

export interface GravimetricMasses {
  /** true (buoyancy-corrected) mass, g */
  trueMassG: string;
  /** the balance reading that corresponds to it, g, full precision */
  readingG: string;
  /** the reading to aim for, with the balance's decimals, in g */
  readingShownG: string;
  buoyancyFactor: string;
}

/** plan.dilution of a gravimetric dilution (volumetric plans have no `method` and are unchanged). */
export interface GravimetricPlan {
  method: 'gravimetric';
  target: { value: string; unit: 'mg/kg' };
  plannedFinalMassG: string;
  /** w1 = γ1/ρ1 (mg/kg), or the parent's own mass fraction when the parent is itself gravimetric */
  parentMassFraction: SourcedValue;
  parentDensity: SourcedValue;
  finalDensity: SourcedValue;
  airDensity: SourcedValue;
  /** aliquot of parent to weigh and the final solution to weigh up to */
  aliquot: GravimetricMasses;
  final: GravimetricMasses;
  /** the expected result with the planned masses (mass fraction, mass concentration, budgets) */
  planned: { massFraction: DilutionResult; massConcentration: DilutionResult; buoyancyRatio: string };
  calcVersion: string;
}

/** One record of both readings (append-only; a correction supersedes). */
export interface GravimetricReadingDto {
  id: number;
  unit: 'g' | 'mg';
  aliquotReading: string;
  finalReading: string;
  /** how each reading came in (aliquotReading | finalReading); rows from before issue 15 show as typed, not_recorded */
  captures: Partial<Record<(typeof GRAVIMETRIC_READING_FIELDS)[number], StoredCapture>>;
  balance: { id: number; identifier: string; snapshot: Balance };
  conditions: ConditionsUsed;
  /** g/mL (CIPM-2007) with its standard uncertainty */
  airDensity: { value: string; standardUncertainty: string };
  supersedesId?: number;
  supersededById?: number;
  correctionReason?: string;
  recordedBy: { id: number; fullName: string };
  recordedAt: string;
}

/** The stored result of a gravimetric dilution (preparations.dilution_result, migration 0011). */
export interface GravimetricResult {
  method: 'gravimetric';
  /** w2, mg/kg, with its GUM budget */
  massFraction: DilutionResult;
  /** γ2 = w2·ρ_final, mg/L, with its GUM budget (u(ρ_final) an input) */
  massConcentration: DilutionResult;
  buoyancyRatio: string;
  /** both, as on the label: "w ± U mg/kg (k = 2); γ ± U mg/L (k = 2)" */
  display: string;
  inputs: {
    parentMassFraction: SourcedValue;
    parentDensity: SourcedValue;
    finalDensity: SourcedValue;
    airDensity: SourcedValue;
    aliquotReading: { value: string; unit: 'g' | 'mg'; standardUncertainty: string; basis: string };
    finalReading: { value: string; unit: 'g' | 'mg'; standardUncertainty: string; basis: string };
    weightDensity: string;
  };
  calcVersion: string;
  basedOn: { readingsId: number };
}

/** The gravimetric part of a preparation's detail (LineageSection.gravimetric). */
export interface GravimetricDilutionSection {
  method: 'gravimetric';
  parent: { id: number; identifier: string; snapshot: ParentSnapshot };
  plan: GravimetricPlan;
  gates: Gate[];
  readings: GravimetricReadingDto[];
  result?: GravimetricResult;
}
