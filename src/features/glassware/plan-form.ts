/**
 * The "Plan a check" form: what the technician or chemist picks and types, and how it becomes the body of
 * POST /api/volume-checks (volumeCheckPlanInputSchema, shared with the server). Numbers stay strings as typed.
 * Field names are the request's dotted paths, so the server's `error.fields` land on the input they name
 * (the one exception: the optional evaporation loss is typed in mg as `conditions.evaporationMg`).
 */
import { z } from 'zod';
import { volumeCheckPlanInputSchema, type VolumeCheckPlanInput } from '../../../shared/schemas/volume-check.ts';

export const planFormSchemaBase = z.object({
  wareId: z.string(),
  balanceId: z.string(),
  replicates: z.string(),
  material: z.string(),
  intervalMonths: z.string(),
  conditions: z.object({
    waterTemperatureC: z.string(),
    waterAirSaturated: z.boolean(),
    air: z.object({ temperatureC: z.string(), pressureHPa: z.string(), relativeHumidityPct: z.string() }),
    evaporationMg: z.string(),
  }),
  notes: z.string(),
});
export type PlanFormValues = z.infer<typeof planFormSchemaBase>;

export const EMPTY_CHECK_PLAN: PlanFormValues = {
  wareId: '',
  balanceId: '',
  replicates: '10',
  material: '',
  intervalMonths: '12',
  conditions: { waterTemperatureC: '', waterAirSaturated: false, air: { temperatureC: '', pressureHPa: '', relativeHumidityPct: '' }, evaporationMg: '' },
  notes: '',
};

/** Every field the server may name in `error.fields`, as the form calls it. */
export const CHECK_PLAN_FIELDS = [
  'wareId',
  'balanceId',
  'replicates',
  'material',
  'intervalMonths',
  'conditions.waterTemperatureC',
  'conditions.air.temperatureC',
  'conditions.air.pressureHPa',
  'conditions.air.relativeHumidityPct',
  'conditions.evaporationMg',
  'notes',
] as const;

/** A request path → the form field it belongs to. */
export function formFieldOf(path: string): string {
  if (path.startsWith('conditions.evaporation')) return 'conditions.evaporationMg';
  if (path === 'conditions.air') return 'conditions.air.temperatureC';
  return path;
}

const WHOLE = /^\d{1,4}$/;

/**
 * The form values → the request body, or the messages per form field. `isPiston`: piston pipettes take no
 * replicate count (ISO 8655-6 fixes 10 at each tested volume).
 */
export function toPlanInput(v: PlanFormValues, isPiston: boolean): { input: VolumeCheckPlanInput } | { errors: Record<string, string> } {
  const errors: Record<string, string> = {};
  const whole = (text: string, field: string, message: string): number | undefined => {
    const t = text.trim();
    if (t === '') return undefined;
    if (!WHOLE.test(t)) {
      errors[field] = message;
      return undefined;
    }
    return Number(t);
  };
  if (v.wareId === '') errors.wareId = 'Choose the ware to check';
  if (v.balanceId === '') errors.balanceId = 'Choose the balance';
  const replicates = isPiston ? undefined : whole(v.replicates, 'replicates', 'Replicates is a whole number from 2 to 30');
  if (!isPiston && v.replicates.trim() === '') errors.replicates = 'Enter the number of replicates (10 is common practice)';
  const intervalMonths = whole(v.intervalMonths, 'intervalMonths', 'Interval is a whole number of months from 1 to 60');
  const evap = v.conditions.evaporationMg.trim();
  const body = {
    wareId: v.wareId === '' ? 0 : Number(v.wareId),
    balanceId: v.balanceId === '' ? 0 : Number(v.balanceId),
    ...(replicates !== undefined ? { replicates } : {}),
    ...(v.material ? { material: v.material } : {}),
    ...(intervalMonths !== undefined ? { intervalMonths } : {}),
    conditions: {
      waterTemperatureC: v.conditions.waterTemperatureC,
      waterAirSaturated: v.conditions.waterAirSaturated,
      air: { ...v.conditions.air },
      ...(evap ? { evaporation: { value: evap, unit: 'mg' } } : {}),
    },
    ...(v.notes.trim() ? { notes: v.notes.trim() } : {}),
  };
  const parsed = volumeCheckPlanInputSchema.safeParse(body);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const field = formFieldOf(issue.path.join('.'));
      if (field === 'wareId' && v.wareId === '') continue;
      if (field === 'balanceId' && v.balanceId === '') continue;
      errors[field] ??= issue.message;
    }
  }
  if (Object.keys(errors).length || !parsed.success) return { errors };
  return { input: parsed.data };
}

/** The resolver's schema: the form's shape, checked by the shared request schema. */
export const planFormSchema = (isPiston: () => boolean) =>
  planFormSchemaBase.superRefine((v, ctx) => {
    const r = toPlanInput(v, isPiston());
    if ('errors' in r) for (const [path, message] of Object.entries(r.errors)) ctx.addIssue({ code: 'custom', path: path.split('.'), message });
  });

/**
 * A balance refused by the server (400, `fields.balanceId`: the failed gates joined by "; ") → one message per
 * gate, shown as the preparation plan page shows its blocking checks.
 */
export function refusedGates(message: string | undefined): Array<{ code: string; severity: 'block'; message: string; action: string }> {
  if (!message) return [];
  return message
    .split('; ')
    .map((m) => m.trim())
    .filter(Boolean)
    .map((m, i) => ({
      code: `balance_gate_${i}`,
      severity: 'block' as const,
      message: m.replace(/\.$/, ''),
      action: /calibration|overdue|out of service|no calibration/.test(m)
        ? 'Choose a balance in calibration, or have this one calibrated first'
        : /minimum weight/.test(m)
          ? 'Choose a balance whose minimum weight is below the smallest water mass'
          : /reads|readability/.test(m)
            ? 'Choose a balance that reads finer (ISO 8655-6 table)'
            : /capacity/.test(m)
              ? 'Choose a balance with a larger capacity'
              : 'Choose another balance',
    }));
}
