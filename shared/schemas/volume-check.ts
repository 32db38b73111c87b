/**
 * Gravimetric checks of volumetric ware: the request of POST /api/calc/volume-check (stateless) and the
 * inputs of stored checks (plan, readings, corrections). Every number is a decimal string as typed; the
 * metrology core (shared/calc/volume-check.ts) checks ranges and units and names the field when it refuses.
 */
import { z } from 'zod';
import { DECIMAL_TEXT, decimalCheck } from './decimal-text.ts';
import { CHECK_WARE_KINDS, CHECK_WARE_MATERIALS } from '../calc/volume-tolerances.ts';
import type { VolumeCheckRequest, VolumeCheckResponse } from '../calc/volume-check.ts';

export type { VolumeCheckRequest, VolumeCheckResponse };

const FORMAT = 'Enter a decimal number such as 9.9821 (use a point, not a comma)';
const number = (what: string) => z.string({ error: `Enter ${what} as a number, e.g. 9.9821` }).trim().min(1, `Enter ${what}`).regex(DECIMAL_TEXT, FORMAT);
const positive = (what: string) => decimalCheck((d) => d.gt(0), `${what} must be greater than 0`, FORMAT);
const nonNegative = (what: string) => decimalCheck((d) => !d.isNeg(), `${what} must not be negative`, FORMAT);
const unitText = z.string({ error: 'Choose a unit' }).trim().min(1, 'Choose a unit').max(10, 'Choose a unit');
const quantity = (what: string) => z.object({ value: positive(what), unit: unitText });
const quantity0 = (what: string) => z.object({ value: nonNegative(what), unit: unitText });

export const volumeCheckAirSchema = z.object({
  temperatureC: number('the air temperature in °C').optional(),
  pressureHPa: positive('The air pressure').optional(),
  relativeHumidityPct: decimalCheck((d) => !d.isNeg() && d.lte(100), 'Relative humidity must be from 0 to 100 %', FORMAT).optional(),
  co2MoleFraction: decimalCheck((d) => !d.isNeg() && d.lte('0.01'), 'CO2 mole fraction must be from 0 to 0.01 (0.0004 = 400 ppm)', FORMAT).optional(),
  density: quantity('The air density').optional(),
});

export const volumeCheckRequestSchema = z.object({
  ware: z.object({
    kind: z.enum(['bulb_pipette', 'volumetric_flask', 'piston_pipette', 'burette'], { error: `Kind is one of: ${CHECK_WARE_KINDS.join(', ')}` }),
    nominal: quantity('The nominal volume'),
    class: z.enum(['A', 'B'], { error: 'Class is A, B or null' }).nullable(),
    material: z.enum(['borosilicate_3_3', 'soda_lime', 'polypropylene'], { error: `Material is one of: ${CHECK_WARE_MATERIALS.join(', ')}` }),
    mode: z.enum(['delivery', 'content'], { error: 'Mode is delivery or content' }),
    testedVolume: quantity('The tested volume').optional(),
    limits: z
      .object({
        systematic: quantity('The systematic limit'),
        random: quantity('The random limit').optional(),
        source: z.string({ error: 'Name the source of the limits' }).trim().min(3, 'Name the source of the limits').max(300, 'Use at most 300 characters'),
      })
      .optional(),
  }),
  readings: z.array(quantity('The reading'), { error: 'Send the readings as a list' }).min(2, 'Enter at least two readings (the random error needs n ≥ 2)').max(100, 'At most 100 readings'),
  waterTemperatureC: number('the water temperature in °C'),
  waterAirSaturated: z.boolean({ error: 'waterAirSaturated is true or false' }).optional(),
  air: volumeCheckAirSchema,
  balance: z
    .object({
      weightDensity: quantity('The weight density').optional(),
      readability: quantity('The readability').optional(),
      standardUncertainty: quantity0('The balance standard uncertainty').optional(),
    })
    .optional(),
  evaporation: quantity0('The evaporation loss').optional(),
  waterTemperatureStandardUncertainty: nonNegative('The water temperature uncertainty').optional(),
});

export type VolumeCheckRequestInput = z.infer<typeof volumeCheckRequestSchema>;

// The parsed request is accepted by the core (compile-time check).
type _Assignable = VolumeCheckRequestInput extends VolumeCheckRequest ? true : never;
const requestTypeCheck: _Assignable = true;
void requestTypeCheck;

// ---------------------------------------------------------------- stored checks

const id = (what: string) => z.number({ error: `Choose ${what}` }).int(`Choose ${what}`).positive(`Choose ${what}`);

/** POST /api/volume-checks: a check planned from an inventory item. */
export const volumeCheckPlanInputSchema = z.object({
  wareId: id('the ware to check'),
  balanceId: id('the balance'),
  /** glass only: replicates chosen by the lab (piston pipettes: 10 per tested volume, ISO 8655-6) */
  replicates: z.number({ error: 'Replicates is a whole number from 2 to 30' }).int('Replicates is a whole number from 2 to 30').min(2, 'At least 2 replicates').max(30, 'At most 30 replicates').optional(),
  /** overrides the material read from the inventory text */
  material: z.enum(['borosilicate_3_3', 'soda_lime', 'polypropylene'], { error: 'Material is borosilicate_3_3, soda_lime or polypropylene' }).optional(),
  intervalMonths: z.number({ error: 'Interval is a whole number of months from 1 to 60' }).int('Interval is a whole number of months from 1 to 60').min(1, 'At least 1 month').max(60, 'At most 60 months').optional(),
  conditions: z.object({
    waterTemperatureC: number('the water temperature in °C'),
    waterAirSaturated: z.boolean({ error: 'true or false' }).optional(),
    air: z.object({
      temperatureC: number('the air temperature in °C'),
      pressureHPa: positive('The air pressure'),
      relativeHumidityPct: decimalCheck((d) => !d.isNeg() && d.lte(100), 'Relative humidity must be from 0 to 100 %', FORMAT),
    }),
    evaporation: quantity0('The evaporation loss').optional(),
  }),
  notes: z.string().trim().max(2000, 'Use at most 2000 characters').optional(),
});
export type VolumeCheckPlanInput = z.infer<typeof volumeCheckPlanInputSchema>;

/** POST /api/volume-checks/:key/readings: one net reading as the balance showed it, or a correction of one. */
export const volumeCheckReadingInputSchema = z.object({
  testedIndex: z.number({ error: 'Choose the tested volume' }).int().min(0, 'Choose the tested volume'),
  replicate: z.number({ error: 'Choose the replicate' }).int('Choose the replicate').min(1, 'Replicates count from 1'),
  value: positive('The reading'),
  unit: z.enum(['g', 'mg'], { error: 'The reading is in g or mg' }),
  supersedesId: z.number().int().positive().optional(),
  correctionReason: z.string().trim().min(3, 'Give the reason for the correction (at least 3 characters)').max(500, 'Use at most 500 characters').optional(),
});
export type VolumeCheckReadingInput = z.infer<typeof volumeCheckReadingInputSchema>;

/** POST /api/volume-checks/:key/signatures */
export const volumeCheckSignatureInputSchema = z.object({
  meaning: z.enum(['prepared', 'verified', 'returned'], { error: 'Meaning is prepared, verified or returned' }),
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(200),
  reason: z.string().trim().min(3, 'Give a reason (at least 3 characters)').max(500, 'Use at most 500 characters').optional(),
  checklist: z.record(z.string(), z.boolean()).optional(),
  acknowledgeResponsibility: z.boolean().optional(),
});
export type VolumeCheckSignatureInput = z.infer<typeof volumeCheckSignatureInputSchema>;
