/**
 * The calculation form: what the chemist types, and how it becomes a
 * `POST /api/calc/preparation` request.
 *
 * Every measured value stays a string exactly as typed ("8.0" keeps its digits). The form's field
 * names are the request's dotted paths (`material.purity.value`, `air.temperatureC`…), so a
 * CalcError's `field`, a shared-schema issue path and a server `error.fields` key all land on the
 * input they name. The only fields that are not in the request are the two mode switches
 * (`material.purity.mode`, `air.mode`), which choose which branch of the request is sent.
 */
import { z } from 'zod';
import { DECIMAL_TEXT } from '../../../shared/schemas/decimal-text.ts';
import {
  AMOUNT_CONCENTRATION_UNITS,
  DENSITY_UNITS,
  MASS_CONCENTRATION_UNITS,
  MASS_UNITS,
  VOLUME_UNITS,
} from '../../../shared/calc/units.ts';

export const TARGET_UNITS = [...MASS_CONCENTRATION_UNITS, ...AMOUNT_CONCENTRATION_UNITS] as const;
export const READING_UNITS = ['mg', 'g'] as const satisfies readonly (typeof MASS_UNITS)[number][];
export const BALANCE_U_UNITS = ['µg', 'mg', 'g'] as const satisfies readonly (typeof MASS_UNITS)[number][];
export { DENSITY_UNITS, VOLUME_UNITS };

const num = (what: string) =>
  z
    .string()
    .trim()
    .min(1, `Enter ${what}`)
    .regex(DECIMAL_TEXT, `Enter ${what} as a number, e.g. 100.0 (use a point, not a comma)`);

/** Optional decimal: empty means "not given". */
const optNum = z
  .string()
  .trim()
  .refine((s) => s === '' || DECIMAL_TEXT.test(s), 'Enter a number (use a point, not a comma), or leave it empty');

/** Not a measured-value calculation: only "is this text a number above zero?" for instant feedback. */
const positive = (what: string) =>
  num(what).refine((s) => !/^[-]/.test(s) && /[1-9]/.test(s.split(/[eE]/)[0] ?? ''), `${what[0]?.toUpperCase()}${what.slice(1)} must be greater than zero`);

const formula = z
  .string()
  .trim()
  .max(100, 'Use at most 100 characters')
  .refine((s) => !/[·•*]/.test(s), 'Write hydrates with brackets, e.g. CuSO4(H2O)5');

export const calcFormSchema = z
  .object({
    target: z.object({ value: positive('the target concentration'), unit: z.enum(TARGET_UNITS) }),
    volume: z.object({
      value: positive('the final volume'),
      unit: z.enum(VOLUME_UNITS),
      standardUncertainty: optNum,
    }),
    material: z.object({
      formula,
      analyteFormula: formula,
      purity: z.object({
        mode: z.enum(['standard', 'expanded']),
        value: positive('the purity (mass fraction, e.g. 0.9995)'),
        standardUncertainty: optNum,
        expandedUncertainty: optNum,
        k: optNum,
      }),
      density: z.object({ value: positive('the density of the solid'), unit: z.enum(DENSITY_UNITS) }),
    }),
    balance: z.object({
      weightDensity: z.object({ value: positive('the calibration-weight density'), unit: z.enum(DENSITY_UNITS) }),
      standardUncertainty: z.object({ value: optNum, unit: z.enum(BALANCE_U_UNITS) }),
    }),
    air: z.object({
      mode: z.enum(['conditions', 'fixed']),
      temperatureC: optNum,
      pressureHPa: optNum,
      relativeHumidityPct: optNum,
      density: z.object({ value: optNum, unit: z.enum(DENSITY_UNITS) }),
    }),
    weighing: z.object({ reading: z.object({ value: optNum, unit: z.enum(READING_UNITS) }) }),
  })
  .superRefine((v, ctx) => {
    const need = (ok: boolean, path: string[], message: string) => {
      if (!ok) ctx.addIssue({ code: 'custom', path, message });
    };
    if (v.material.purity.mode === 'expanded') {
      const hasU = v.material.purity.expandedUncertainty !== '';
      const hasK = v.material.purity.k !== '';
      need(hasU || !hasK, ['material', 'purity', 'expandedUncertainty'], 'Enter the expanded uncertainty U, or clear k');
      need(hasK || !hasU, ['material', 'purity', 'k'], 'Enter the coverage factor k (often 2)');
    }
    if (v.air.mode === 'conditions') {
      need(v.air.temperatureC !== '', ['air', 'temperatureC'], 'Enter the air temperature');
      need(v.air.pressureHPa !== '', ['air', 'pressureHPa'], 'Enter the air pressure');
      need(v.air.relativeHumidityPct !== '', ['air', 'relativeHumidityPct'], 'Enter the relative humidity');
    } else {
      need(v.air.density.value !== '', ['air', 'density', 'value'], 'Enter the air density');
    }
  });

export type CalcFormIn = z.input<typeof calcFormSchema>;
export type CalcFormOut = z.output<typeof calcFormSchema>;

/** Our own worked example: a 1000 mg/L lead standard from lead(II) nitrate. */
export const EXAMPLE_VALUES: CalcFormIn = {
  target: { value: '1000', unit: 'mg/L' },
  volume: { value: '100.0', unit: 'mL', standardUncertainty: '0.05' },
  material: {
    formula: 'Pb(NO3)2',
    analyteFormula: 'Pb',
    purity: { mode: 'expanded', value: '0.9995', standardUncertainty: '', expandedUncertainty: '0.0005', k: '2' },
    density: { value: '4.53', unit: 'g/mL' },
  },
  balance: {
    weightDensity: { value: '8.0', unit: 'g/mL' },
    standardUncertainty: { value: '0.05', unit: 'mg' },
  },
  air: {
    mode: 'conditions',
    temperatureC: '21.0',
    pressureHPa: '1009',
    relativeHumidityPct: '45',
    density: { value: '0.0012', unit: 'g/mL' },
  },
  weighing: { reading: { value: '', unit: 'mg' } },
};

/** Every input the user can type into, by its dotted name (the mode switches are radios). */
export const FORM_FIELDS = [
  'target.value',
  'target.unit',
  'volume.value',
  'volume.unit',
  'volume.standardUncertainty',
  'material.formula',
  'material.analyteFormula',
  'material.purity.mode',
  'material.purity.value',
  'material.purity.standardUncertainty',
  'material.purity.expandedUncertainty',
  'material.purity.k',
  'material.density.value',
  'material.density.unit',
  'balance.weightDensity.value',
  'balance.weightDensity.unit',
  'balance.standardUncertainty.value',
  'balance.standardUncertainty.unit',
  'air.mode',
  'air.temperatureC',
  'air.pressureHPa',
  'air.relativeHumidityPct',
  'air.density.value',
  'air.density.unit',
  'weighing.reading.value',
  'weighing.reading.unit',
] as const;
export type FormField = (typeof FORM_FIELDS)[number];

/**
 * Maps a request path (from a CalcError, a schema issue or the server) to the form field that shows it.
 * "material.purity" → "material.purity.value"; "air" → the first visible air input; unknown → null.
 */
export function formFieldFor(path: string | undefined, values: Pick<CalcFormOut, 'air'> | undefined): FormField | null {
  if (!path) return null;
  const p = path.replace(/\[(\d+)\]/g, '.$1');
  if ((FORM_FIELDS as readonly string[]).includes(p)) return p as FormField;
  if ((FORM_FIELDS as readonly string[]).includes(`${p}.value`)) return `${p}.value` as FormField;
  if (p === 'air' || p.startsWith('air.')) {
    if (p.startsWith('air.density')) return 'air.density.value';
    return values?.air.mode === 'fixed' ? 'air.density.value' : 'air.temperatureC';
  }
  if (p === 'material.purity.expanded' || p === 'material.purity.U') return 'material.purity.expandedUncertainty';
  // Walk up: "balance.standardUncertainty.foo" → "balance.standardUncertainty" → first field below it.
  const parts = p.split('.');
  while (parts.length > 0) {
    const prefix = parts.join('.');
    const hit = FORM_FIELDS.find((f) => f.startsWith(`${prefix}.`) && !f.endsWith('.mode'));
    if (hit) return hit;
    parts.pop();
  }
  return null;
}

/** The request exactly as the API and the core take it; every number is the string the user typed. */
export function toRequest(v: CalcFormOut, rounding?: 'half-even' | 'half-up') {
  const purity =
    v.material.purity.mode === 'expanded'
      ? {
          value: v.material.purity.value,
          ...(v.material.purity.expandedUncertainty !== ''
            ? { expandedUncertainty: v.material.purity.expandedUncertainty, k: v.material.purity.k }
            : {}),
        }
      : {
          value: v.material.purity.value,
          ...(v.material.purity.standardUncertainty !== '' ? { standardUncertainty: v.material.purity.standardUncertainty } : {}),
        };
  return {
    target: { value: v.target.value, unit: v.target.unit },
    volume: {
      value: v.volume.value,
      unit: v.volume.unit,
      ...(v.volume.standardUncertainty !== '' ? { standardUncertainty: v.volume.standardUncertainty } : {}),
    },
    material: {
      ...(v.material.formula !== '' ? { formula: v.material.formula } : {}),
      ...(v.material.analyteFormula !== '' ? { analyteFormula: v.material.analyteFormula } : {}),
      purity,
      density: { value: v.material.density.value, unit: v.material.density.unit },
    },
    balance: {
      weightDensity: { value: v.balance.weightDensity.value, unit: v.balance.weightDensity.unit },
      ...(v.balance.standardUncertainty.value !== ''
        ? { standardUncertainty: { value: v.balance.standardUncertainty.value, unit: v.balance.standardUncertainty.unit } }
        : {}),
    },
    air:
      v.air.mode === 'fixed'
        ? { density: { value: v.air.density.value, unit: v.air.density.unit } }
        : { temperatureC: v.air.temperatureC, pressureHPa: v.air.pressureHPa, relativeHumidityPct: v.air.relativeHumidityPct },
    ...(v.weighing.reading.value !== ''
      ? { weighing: { reading: { value: v.weighing.reading.value, unit: v.weighing.reading.unit } } }
      : {}),
    ...(rounding ? { rounding } : {}),
  };
}
export type FormRequest = ReturnType<typeof toRequest>;

/** Short names for the error summary ("Purity uncertainty: Enter a number…"). */
export const FIELD_LABELS: Record<FormField, string> = {
  'target.value': 'Target concentration',
  'target.unit': 'Concentration unit',
  'volume.value': 'Final volume',
  'volume.unit': 'Volume unit',
  'volume.standardUncertainty': 'Volume uncertainty',
  'material.formula': 'Compound formula',
  'material.analyteFormula': 'Analyte formula',
  'material.purity.mode': 'Purity uncertainty type',
  'material.purity.value': 'Purity',
  'material.purity.standardUncertainty': 'Purity standard uncertainty',
  'material.purity.expandedUncertainty': 'Purity expanded uncertainty',
  'material.purity.k': 'Coverage factor k',
  'material.density.value': 'Density of the solid',
  'material.density.unit': 'Density unit',
  'balance.weightDensity.value': 'Calibration-weight density',
  'balance.weightDensity.unit': 'Weight density unit',
  'balance.standardUncertainty.value': 'Reading uncertainty',
  'balance.standardUncertainty.unit': 'Reading uncertainty unit',
  'air.mode': 'Air density source',
  'air.temperatureC': 'Temperature',
  'air.pressureHPa': 'Pressure',
  'air.relativeHumidityPct': 'Relative humidity',
  'air.density.value': 'Air density',
  'air.density.unit': 'Air density unit',
  'weighing.reading.value': 'Balance reading',
  'weighing.reading.unit': 'Reading unit',
};
