/**
 * The "Plan a standard" form: what the chemist picks and types, and how it becomes the PlanInput body
 * of POST /api/preparations/preview and POST /api/preparations (shared/schemas/preparations.ts).
 * Numbers stay strings exactly as typed. Field names are the request's dotted paths, so the server's
 * `error.fields` land on the input they name.
 */
import { z } from 'zod';
import { DECIMAL_TEXT } from '../../../shared/schemas/decimal-text.ts';
import { CONCENTRATION_UNITS, VOLUME_UNITS } from '../../../shared/calc/units.ts';
import type { ConditionsInput, CreatePreparationInput } from './types.ts';
import { localInputToIso } from './components/conditions-fields.tsx';

export { CONCENTRATION_UNITS, VOLUME_UNITS };

const num = (what: string) =>
  z.string().trim().min(1, `Enter ${what}`).regex(DECIMAL_TEXT, `Enter ${what} as a number, e.g. 100.0 (use a point, not a comma)`);
const optNum = (what: string) =>
  z
    .string()
    .trim()
    .refine((s) => s === '' || DECIMAL_TEXT.test(s), `Enter ${what} as a number (use a point, not a comma)`);

export const conditionsFormSchema = z
  .object({
    source: z.enum(['measured', 'lab-default']),
    temperatureC: optNum('the temperature'),
    pressureHPa: optNum('the pressure'),
    relativeHumidityPct: optNum('the relative humidity'),
    measuredAt: z.string(),
  })
  .superRefine((c, ctx) => {
    if (c.source !== 'measured') return;
    if (c.temperatureC === '') ctx.addIssue({ code: 'custom', path: ['temperatureC'], message: 'Enter the air temperature, or use the lab defaults' });
    if (c.pressureHPa === '') ctx.addIssue({ code: 'custom', path: ['pressureHPa'], message: 'Enter the air pressure, or use the lab defaults' });
    if (c.relativeHumidityPct === '') ctx.addIssue({ code: 'custom', path: ['relativeHumidityPct'], message: 'Enter the relative humidity, or use the lab defaults' });
  });
export type ConditionsFormIn = z.input<typeof conditionsFormSchema>;

export const planFormSchema = z
  .object({
    materialId: z.string().min(1, 'Choose a reference material'),
    analyteFormula: z.string().trim().min(1, 'Choose the analyte'),
    target: z.object({ value: num('the target concentration'), unit: z.enum(CONCENTRATION_UNITS) }),
    volumeMode: z.enum(['flask', 'free']),
    flaskId: z.string(),
    volume: z.object({ value: optNum('the final volume'), unit: z.enum(VOLUME_UNITS) }),
    balanceId: z.string().min(1, 'Choose a balance'),
    conditions: conditionsFormSchema,
    notes: z.string().max(2000, 'Use at most 2000 characters'),
  })
  .superRefine((v, ctx) => {
    if (v.volumeMode === 'flask' && v.flaskId === '') ctx.addIssue({ code: 'custom', path: ['flaskId'], message: 'Choose a volumetric flask, or enter a final volume' });
    if (v.volumeMode === 'free' && v.volume.value === '') ctx.addIssue({ code: 'custom', path: ['volume', 'value'], message: 'Enter the final volume' });
  });
export type PlanFormIn = z.input<typeof planFormSchema>;
export type PlanFormOut = z.output<typeof planFormSchema>;

export const PLAN_FIELDS = [
  'materialId',
  'analyteFormula',
  'target.value',
  'target.unit',
  'flaskId',
  'volume.value',
  'volume.unit',
  'balanceId',
  'conditions.source',
  'conditions.temperatureC',
  'conditions.pressureHPa',
  'conditions.relativeHumidityPct',
  'conditions.measuredAt',
  'notes',
] as const;

export const EMPTY_PLAN: PlanFormIn = {
  materialId: '',
  analyteFormula: '',
  target: { value: '1000', unit: 'mg/L' },
  volumeMode: 'flask',
  flaskId: '',
  volume: { value: '', unit: 'mL' },
  balanceId: '',
  conditions: { source: 'measured', temperatureC: '', pressureHPa: '', relativeHumidityPct: '', measuredAt: '' },
  notes: '',
};

export function toConditionsInput(c: ConditionsFormIn): ConditionsInput {
  if (c.source === 'lab-default') return { source: 'lab-default' };
  const at = localInputToIso(c.measuredAt);
  return {
    source: 'measured',
    temperatureC: c.temperatureC.trim(),
    pressureHPa: c.pressureHPa.trim(),
    relativeHumidityPct: c.relativeHumidityPct.trim(),
    ...(at ? { measuredAt: at } : {}),
  };
}

/** The request body, or null while the form is not yet complete enough to ask the server. */
export function toPlanInput(v: PlanFormIn): CreatePreparationInput | null {
  const parsed = planFormSchema.safeParse(v);
  if (!parsed.success) return null;
  const f = parsed.data;
  const body: CreatePreparationInput = {
    materialId: Number(f.materialId),
    analyteFormula: f.analyteFormula,
    target: { value: f.target.value, unit: f.target.unit },
    balanceId: Number(f.balanceId),
    conditions: toConditionsInput(f.conditions),
    ...(f.volumeMode === 'flask' ? { flaskId: Number(f.flaskId) } : { volume: { value: f.volume.value, unit: f.volume.unit } }),
  };
  if (f.notes.trim() !== '') body.notes = f.notes.trim();
  return body;
}
