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
