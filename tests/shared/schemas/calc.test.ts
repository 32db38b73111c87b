import { describe, it, expect } from 'vitest';
import { calcPreparationRequestSchema, type CalcPreparationRequest } from '../../../shared/schemas/calc.ts';
import { calculatePreparation } from '../../../shared/calc/index.ts';

// Request of the Pb(NO3)2 worked example (METROLOGY §5.4), with rectangular ±0.0005 purity as a half-width.
const valid = (): CalcPreparationRequest => ({
  target: { value: '1000', unit: 'mg/L' },
  volume: { value: '100.0', unit: 'mL', standardUncertainty: '0.052' },
  material: { formula: 'Pb(NO3)2', analyteFormula: 'Pb', purity: { value: '0.9995', halfWidth: '0.0005' }, density: { value: '4.53', unit: 'g/mL' } },
  balance: { weightDensity: { value: '8.0', unit: 'g/mL' }, standardUncertainty: { value: '0.0179', unit: 'mg' } },
  air: { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' },
  weighing: { reading: { value: '160.07', unit: 'mg' } },
});

function fieldErrors(input: unknown): Record<string, string> {
  const r = calcPreparationRequestSchema.safeParse(input);
  if (r.success) return {};
  return Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
}

describe('calcPreparationRequestSchema', () => {
  it('accepts the worked example and the parsed data runs through the core: "1001.0 ± 2.6 mg/L (k = 2)" [C, METROLOGY §5.4]', () => {
    const parsed = calcPreparationRequestSchema.parse(valid());
    expect(calculatePreparation(parsed).actual!.concentration.display).toBe('1001.0 ± 2.6 mg/L (k = 2)');
  });

  it('keeps decimal strings exactly as typed ("8.0" keeps its digits)', () => {
    const parsed = calcPreparationRequestSchema.parse(valid());
    expect(parsed.balance!.weightDensity!.value).toBe('8.0');
    expect(parsed.volume.value).toBe('100.0');
  });

  it('accepts an air density instead of conditions, and unit aliases', () => {
    const r = valid();
    r.air = { density: { value: '1.2', unit: 'kg/m3' } };
    r.target.unit = 'ug/mL';
    r.volume.unit = 'uL';
    expect(calcPreparationRequestSchema.safeParse(r).success).toBe(true);
  });

  it.each<[string, string, (r: CalcPreparationRequest) => void]>([
    ['number instead of string', 'target.value', (r) => ((r.target as { value: unknown }).value = 1000)],
    ['comma decimal', 'volume.value', (r) => (r.volume.value = '100,0')],
    ['purity > 1', 'material.purity.value', (r) => (r.material.purity.value = '1.5')],
    ['purity 0', 'material.purity.value', (r) => (r.material.purity.value = '0')],
    ['non-concentration target unit', 'target.unit', (r) => (r.target.unit = 'mg')],
    ['bad volume unit', 'volume.unit', (r) => (r.volume.unit = 'cup')],
    ['bad density unit', 'material.density.unit', (r) => (r.material.density.unit = 'mg/L')],
    ['negative volume u', 'volume.standardUncertainty', (r) => (r.volume.standardUncertainty = '-0.1')],
    ['RH > 100', 'air.relativeHumidityPct', (r) => (r.air.relativeHumidityPct = '101')],
    ['missing temperature', 'air.temperatureC', (r) => delete r.air.temperatureC],
    ['both air forms', 'air.density', (r) => (r.air.density = { value: '1.2', unit: 'kg/m3' })],
    ['expanded without k', 'material.purity.k', (r) => (r.material.purity = { value: '0.9995', expandedUncertainty: '0.001' })],
    ['reading unit', 'weighing.reading.unit', (r) => (r.weighing!.reading.unit = 'mL')],
    ['rounding rule', 'rounding', (r) => ((r as { rounding?: string }).rounding = 'nearest')],
  ])('%s → issue at %s with a message', (_n, path, mutate) => {
    const r = valid();
    mutate(r);
    const errs = fieldErrors(r);
    expect(Object.keys(errs)).toContain(path);
    expect(errs[path].length).toBeGreaterThan(5);
  });

  it('mass-fraction targets pass the schema; the core then asks for the solution density at target.unit', () => {
    const r = valid();
    r.target.unit = 'mg/kg';
    const parsed = calcPreparationRequestSchema.parse(r);
    expect(() => calculatePreparation(parsed)).toThrow(expect.objectContaining({ field: 'target.unit', code: 'unit_mismatch' }));
  });
});
