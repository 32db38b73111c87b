import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  convertMass,
  convertVolume,
  convertDensity,
  convertConcentration,
  normaliseUnit,
  unitKind,
  isConcentrationUnit,
  MASS_UNITS,
  VOLUME_UNITS,
  MASS_CONCENTRATION_UNITS,
  MASS_FRACTION_UNITS,
  CalcError,
  D,
} from '../../../shared/calc/index.ts';

describe('unit conversion (exact SI factors)', () => {
  it('mass: 1 g = 1000 mg = 1e6 µg; aliases ug and μg (Greek mu) mean µg (micro sign)', () => {
    expect(convertMass('1', 'g', 'mg').toString()).toBe('1000');
    expect(convertMass('1', 'g', 'µg').toString()).toBe('1000000');
    expect(convertMass('250', 'ug', 'mg').toString()).toBe('0.25');
    expect(convertMass('250', 'μg', 'mg').toString()).toBe('0.25');
    expect(normaliseUnit('μg')).toBe('µg');
    expect(normaliseUnit('ug')).toBe('µg');
  });

  it('volume: 1 L = 1000 mL = 1e6 µL; "uL" alias', () => {
    expect(convertVolume('100.0', 'mL', 'L').toString()).toBe('0.1');
    expect(convertVolume('20', 'uL', 'mL').toString()).toBe('0.02');
    expect(convertVolume('1', 'L', 'µL').toString()).toBe('1000000');
  });

  it('density: 1 g/mL = 1 g/cm3 = 1000 kg/m3 (definition)', () => {
    expect(convertDensity('8.0', 'g/mL', 'kg/m3').toString()).toBe('8000');
    expect(convertDensity('1.2', 'kg/m3', 'g/mL').toString()).toBe('0.0012');
    expect(convertDensity('2.165', 'g/cm3', 'g/mL').toString()).toBe('2.165');
    expect(convertDensity('1.2', 'kg/m³', 'g/cm³').toString()).toBe('0.0012');
  });

  it('mass concentration: 1 µg/mL = 1 mg/L = 1000 µg/L = 1000 ng/mL', () => {
    expect(convertConcentration('1', 'µg/mL', 'mg/L').toString()).toBe('1');
    expect(convertConcentration('1', 'mg/L', 'µg/L').toString()).toBe('1000');
    expect(convertConcentration('1', 'ug/mL', 'ng/mL').toString()).toBe('1000');
    expect(convertConcentration('1000', 'mg/L', 'g/L').toString()).toBe('1');
  });

  it('mass fraction: 1 mg/kg = 1 µg/g (definition)', () => {
    expect(convertConcentration('1', 'mg/kg', 'µg/g').toString()).toBe('1');
    expect(convertConcentration('1', 'ug/g', 'mg/kg').toString()).toBe('1');
  });

  it('mass fraction ↔ mass concentration with the solution density: γ = w·ρ (METROLOGY §5.5)', () => {
    // 1000 mg/kg in 2 % HNO3 of density 1.0091 g/mL (CRC transcription, METROLOGY §9) → 1009.1 mg/L
    expect(convertConcentration('1000', 'mg/kg', 'mg/L', { density: '1.0091' }).toString()).toBe('1009.1');
    expect(convertConcentration('1009.1', 'mg/L', 'mg/kg', { density: { value: '1009.1', unit: 'kg/m3' } }).toString()).toBe('1000');
  });

  it('amount ↔ mass concentration with the molar mass: 1 mmol/L NaCl = 58.44 mg/L (M = 58.440 g/mol, IUPAC/CIAAW abridged)', () => {
    expect(convertConcentration('1', 'mmol/L', 'mg/L', { molarMass: '58.440' }).toString()).toBe('58.44');
    expect(convertConcentration('58.44', 'mg/L', 'mmol/L', { molarMass: '58.440' }).toString()).toBe('1');
    expect(convertConcentration('1', 'mol/L', 'mg/kg', { molarMass: '58.440', density: '1.0' }).toString()).toBe('58440');
  });

  it('mass fraction → mass concentration without density → unit_mismatch with a clear message', () => {
    expect(() => convertConcentration('1', 'mg/kg', 'mg/L')).toThrow(CalcError);
    expect(() => convertConcentration('1', 'mg/kg', 'mg/L')).toThrow(
      'Cannot convert mg/kg (a mass fraction) to mg/L (a mass concentration) without the solution density',
    );
  });

  it('amount → mass concentration without molar mass → unit_mismatch', () => {
    expect(() => convertConcentration('1', 'mmol/L', 'mg/L')).toThrow(expect.objectContaining({ code: 'unit_mismatch' }));
    expect(() => convertConcentration('1', 'mmol/L', 'mg/L')).toThrow(/without the molar mass/);
  });

  it('mixed kinds → unit_mismatch', () => {
    expect(() => convertMass('1', 'mg', 'mL')).toThrow(expect.objectContaining({ code: 'unit_mismatch' }));
    expect(() => convertMass('1', 'mg', 'mL')).toThrow('mL is a volume unit, not a mass unit; use one of µg, mg, g, kg');
    expect(() => convertVolume('1', 'g', 'mL')).toThrow(expect.objectContaining({ code: 'unit_mismatch' }));
    expect(() => convertDensity('1', 'g/mL', 'mg/L')).toThrow(expect.objectContaining({ code: 'unit_mismatch' }));
    expect(() => convertConcentration('1', 'g/mL', 'mg/L')).toThrow(expect.objectContaining({ code: 'unit_mismatch' }));
  });

  it('unknown units → unknown_unit', () => {
    expect(() => convertMass('1', 'lb', 'g')).toThrow(expect.objectContaining({ code: 'unknown_unit' }));
    expect(() => convertConcentration('1', 'ppm', 'mg/L')).toThrow(/Unknown unit "ppm"/);
    expect(unitKind('furlong')).toBeUndefined();
  });

  it('non-positive molar mass or solution density → non_positive', () => {
    expect(() => convertConcentration('1', 'mmol/L', 'mg/L', { molarMass: '0' })).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => convertConcentration('1', 'mg/kg', 'mg/L', { density: '-1' })).toThrow(expect.objectContaining({ code: 'non_positive' }));
  });

  it('isConcentrationUnit', () => {
    expect(isConcentrationUnit('mg/L')).toBe(true);
    expect(isConcentrationUnit('mg/kg')).toBe(true);
    expect(isConcentrationUnit('mmol/L')).toBe(true);
    expect(isConcentrationUnit('mg')).toBe(false);
  });

  it('property: converting there and back returns the exact value (decimal factors are powers of ten)', () => {
    const decimalText = fc
      .tuple(fc.integer({ min: 1, max: 999_999_999 }), fc.integer({ min: -6, max: 6 }))
      .map(([m, e]) => `${m}e${e}`);
    const pair = (units: readonly string[]) => fc.tuple(fc.constantFrom(...units), fc.constantFrom(...units));
    fc.assert(
      fc.property(decimalText, pair(MASS_UNITS), (x, [a, b]) => convertMass(convertMass(x, a, b), b, a).eq(new D(x))),
    );
    fc.assert(
      fc.property(decimalText, pair(VOLUME_UNITS), (x, [a, b]) => convertVolume(convertVolume(x, a, b), b, a).eq(new D(x))),
    );
    fc.assert(
      fc.property(decimalText, pair([...MASS_CONCENTRATION_UNITS, ...MASS_FRACTION_UNITS]), (x, [a, b]) =>
        convertConcentration(convertConcentration(x, a, b, { density: '1.0091' }), b, a, { density: '1.0091' })
          .minus(x)
          .abs()
          .lte(new D(x).abs().mul('1e-35')),
      ),
    );
  });
});
