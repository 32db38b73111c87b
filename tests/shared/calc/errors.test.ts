import { describe, it, expect } from 'vitest';
import {
  CalcError,
  CALC_ERROR_CODES,
  withField,
  toDec,
  isDecInput,
  D,
  airDensityCIPM2007,
  buoyancyFactor,
  molarMass,
  convertMass,
  propagate,
  calculatePreparation,
  type CalcErrorCode,
} from '../../../shared/calc/index.ts';

describe('CalcError', () => {
  it('is an Error with a code, optional field and details', () => {
    const e = new CalcError('non_positive', 'Volume must be greater than 0', { field: 'volume.value', details: { got: '0' } });
    expect(e).toBeInstanceOf(Error);
    expect(e.name).toBe('CalcError');
    expect(e.code).toBe('non_positive');
    expect(e.field).toBe('volume.value');
    expect(e.details).toEqual({ got: '0' });
  });

  it('withField sets the dotted path only when none is set', () => {
    try {
      withField('outer', () => {
        throw new CalcError('invalid_number', 'x');
      });
    } catch (e) {
      expect((e as CalcError).field).toBe('outer');
    }
    try {
      withField('outer', () => {
        throw new CalcError('invalid_number', 'x', { field: 'inner' });
      });
    } catch (e) {
      expect((e as CalcError).field).toBe('inner');
    }
    expect(() => withField('f', () => { throw new TypeError('other'); })).toThrow(TypeError);
  });

  // Every code has at least one real path in the core that produces it.
  const paths: Record<CalcErrorCode, () => unknown> = {
    unit_mismatch: () => convertMass('1', 'mg', 'mL'),
    unknown_unit: () => convertMass('1', 'lb', 'g'),
    calc_out_of_range: () => airDensityCIPM2007({ temperatureC: '31', pressurePa: '101325', relativeHumidity: '0.5' }),
    non_positive: () => buoyancyFactor({ airDensity: '0.0012', sampleDensity: '0' }),
    invalid_number: () => toDec('1,5'),
    invalid_formula: () => molarMass('Xx'),
    division_by_zero: () => propagate({ model: (x) => new D(1).div(x.a), inputs: { a: { value: '0', standardUncertainty: '0.1' } } }),
    missing_input: () =>
      calculatePreparation({
        target: { value: '1', unit: 'mg/L' },
        volume: { value: '100', unit: 'mL' },
        material: { purity: { value: '1' }, density: { value: '2', unit: 'g/mL' } },
        air: {},
      }),
  };
  it.each(CALC_ERROR_CODES.map((c) => [c]))('code path %s', (code) => {
    expect(paths[code]).toThrow(CalcError);
    expect(paths[code]).toThrow(expect.objectContaining({ code }));
  });
});

describe('decimal input', () => {
  it('accepts decimal strings and Dec, keeps 40 digits', () => {
    expect(toDec('1.5e-3').toString()).toBe('0.0015');
    expect(toDec(' 2.50 ').toString()).toBe('2.5');
    expect(toDec(new D('3')).toString()).toBe('3');
    expect(new D(1).div(3).toString()).toBe('0.' + '3'.repeat(40));
    expect(isDecInput('10.0035')).toBe(true);
    expect(isDecInput('1,5')).toBe(false);
  });
  it('ties round to even in the core constructor', () => {
    expect(new D('2.5').toDecimalPlaces(0).toString()).toBe('2');
  });
  it.each([['abc'], ['1,5'], [''], ['NaN'], ['Infinity']])('rejects %j with invalid_number', (s) => {
    expect(() => toDec(s)).toThrow(expect.objectContaining({ code: 'invalid_number' }));
  });
  it('rejects JS numbers (floats must not enter the core) and non-finite Decimals', () => {
    expect(() => toDec(0.1 as unknown as string)).toThrow(expect.objectContaining({ code: 'invalid_number' }));
    expect(() => toDec(new D(Infinity))).toThrow(expect.objectContaining({ code: 'invalid_number' }));
    expect(() => toDec(undefined)).toThrow(expect.objectContaining({ code: 'missing_input' }));
  });
});
