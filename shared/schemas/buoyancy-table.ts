/**
 * GET /api/calc/buoyancy-table?t=&p=&rh=&weightDensity= (and …/buoyancy-table.pdf): the query, shared with the
 * page's form. t, p and rh come together (air temperature °C, pressure hPa, relative humidity %) or not at all
 * (then the lab's stored default room conditions are used); ranges are those of CIPM-2007.
 * weightDensity: the density of the balance's adjustment weights, g/cm³ (default 8.0).
 */
import { z } from 'zod';
import type { BuoyancyTable } from '../calc/buoyancy-table.ts';
import { decimalInRange } from './decimal-text.ts';

/** Query strings arrive as text; an empty field means "not given". */
const optional = <T extends z.ZodTypeAny>(s: T) => z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? undefined : v), s.optional());

export const buoyancyTableQuerySchema = z
  .object({
    t: optional(decimalInRange('15', '27', 'Enter an air temperature between 15 and 27 °C (the range of the CIPM-2007 air-density equation)')),
    p: optional(decimalInRange('600', '1100', 'Enter an air pressure between 600 and 1100 hPa')),
    rh: optional(decimalInRange('0', '100', 'Enter a relative humidity between 0 and 100 %')),
    /** 2–22 g/cm³: steel (about 7.9–8.0), brass (about 8.4), aluminium milligram weights (about 2.7) fit (from memory) */
    weightDensity: optional(decimalInRange('2', '22', 'Enter the weights’ density in g/cm³ between 2 and 22 (stainless steel is 8.0)')),
  })
  .superRefine((q, ctx) => {
    const given = (['t', 'p', 'rh'] as const).filter((k) => q[k] !== undefined);
    if (given.length === 0 || given.length === 3) return;
    const names = { t: 'the air temperature', p: 'the air pressure', rh: 'the relative humidity' } as const;
    for (const k of ['t', 'p', 'rh'] as const) {
      if (q[k] === undefined) ctx.addIssue({ code: 'custom', path: [k], message: `Enter ${names[k]} too, or leave all three empty to use the lab's room conditions` });
    }
  });
export type BuoyancyTableQuery = z.output<typeof buoyancyTableQuerySchema>;

/** The answer: the table and where its air density came from. */
export interface BuoyancyTableResponse extends BuoyancyTable {
  air: {
    source: 'entered' | 'lab-default';
    temperatureC: string;
    pressureHPa: string;
    relativeHumidityPct: string;
    /** g/mL, full precision (CIPM-2007) */
    density: string;
    /** kg/m³ to 4 decimals, for display */
    densityKgPerM3Display: string;
  };
  labName: string;
  generatedAt: string;
}
