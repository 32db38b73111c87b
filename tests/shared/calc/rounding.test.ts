import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  roundToDecimals,
  roundToSignificant,
  countSignificantFigures,
  countDecimalPlaces,
  isSignificanceAmbiguous,
  lastDigitUnit,
  roundGUM,
  formatResult,
  significantFigureResult,
  shownEstimate,
  CalcError,
  D,
} from '../../../shared/calc/index.ts';

describe('rounding on decimal strings', () => {
  it('ISO 80000-1 half-even: 12.25 → 12.2 [M, METROLOGY §6.3]; USP half-up: 12.25 → 12.3 [V-src, METROLOGY §6.3]', () => {
    expect(roundToDecimals('12.25', 1, 'half-even')).toBe('12.2');
    expect(roundToDecimals('12.25', 1, 'half-up')).toBe('12.3');
    expect(roundToDecimals('12.35', 1, 'half-even')).toBe('12.4');
  });

  it('float pitfalls are avoided: 1.005 → 1.01 (half-up), 1.45 → 1.5, 0.125 → 0.12 (half-even), 2.5 → 2 / 3 [METROLOGY §6.4]', () => {
    expect(roundToDecimals('1.005', 2, 'half-up')).toBe('1.01'); // (1.005).toFixed(2) gives "1.00"
    expect(roundToDecimals('1.45', 1, 'half-up')).toBe('1.5'); // (1.45).toFixed(1) gives "1.4"
    expect(roundToDecimals('0.125', 2, 'half-even')).toBe('0.12');
    expect(roundToDecimals('2.5', 0, 'half-even')).toBe('2');
    expect(roundToDecimals('2.5', 0, 'half-up')).toBe('3');
    expect(roundToDecimals('-2.5', 0, 'half-up')).toBe('-3'); // ties away from zero, unlike Math.round(-2.5) = -2
  });

  it('trailing zeros are kept', () => {
    expect(roundToDecimals('2.5', 3)).toBe('2.500');
    expect(roundToDecimals('100', 1)).toBe('100.0');
    expect(roundToSignificant('2', 3)).toBe('2.00');
    expect(roundToSignificant('0.0900', 2)).toBe('0.090');
  });

  it('negative places round left of the point', () => {
    expect(roundToDecimals('1250', -2, 'half-even')).toBe('1200');
    expect(roundToDecimals('1250', -2, 'half-up')).toBe('1300');
  });

  it('significant figures: never an ambiguous "1200"', () => {
    expect(roundToSignificant('1234.5', 2)).toBe('1.2e+3');
    expect(roundToSignificant('1234.5', 4)).toBe('1234'); // half-even tie
    expect(roundToSignificant('1234.5', 4, 'half-up')).toBe('1235');
    expect(roundToSignificant('0.0012345', 3)).toBe('0.00123');
    expect(roundToSignificant('99.96', 3)).toBe('1.00e+2'); // not "100", which would read as one figure
    expect(roundToSignificant('99.96', 2)).toBe('1.0e+2');
  });

  it('invalid arguments → CalcError', () => {
    expect(() => roundToDecimals('1.2', 1.5)).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
    expect(() => roundToSignificant('1.2', 0)).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
    expect(() => roundToDecimals('1,2', 1)).toThrow(expect.objectContaining({ code: 'invalid_number' }));
    expect(() => roundToDecimals('1.2', 1, 'banker' as never)).toThrow(CalcError);
  });

  it('property: half-even and half-up differ only on exact ties', () => {
    fc.assert(
      fc.property(fc.integer({ min: -1_000_000, max: 1_000_000 }), (n) => {
        const x = new D(n).div(1000).toFixed(); // three decimals, round to two
        const even = roundToDecimals(x, 2, 'half-even');
        const up = roundToDecimals(x, 2, 'half-up');
        const isTie = x.endsWith('5') && x.includes('.') && x.split('.')[1].length === 3;
        return isTie || even === up;
      }),
    );
  });
});

describe('significant figures as typed', () => {
  it.each([
    ['100.0', 4],
    ['100', 1],
    ['100.', 3],
    ['0.0050', 2],
    ['160.07', 5],
    ['0.9995', 4],
    ['1.20e3', 3],
    ['1200', 2],
    ['8.0', 2],
    ['-0.030', 2],
    ['0.00', 2],
    ['0', 1],
  ])('common practice (classical rules, METROLOGY §6.1): %s has %i significant figures', (s, n) => {
    expect(countSignificantFigures(s)).toBe(n);
  });

  it('decimal places and last digit as typed', () => {
    expect(countDecimalPlaces('100.0')).toBe(1);
    expect(countDecimalPlaces('160.07')).toBe(2);
    expect(countDecimalPlaces('100')).toBe(0);
    expect(countDecimalPlaces('1.20e3')).toBe(-1);
    expect(lastDigitUnit('160.07').toString()).toBe('0.01');
    expect(lastDigitUnit('1.5e-3').toString()).toBe('0.0001');
    expect(isSignificanceAmbiguous('1200')).toBe(true);
    expect(isSignificanceAmbiguous('1200.')).toBe(false);
    expect(isSignificanceAmbiguous('1201')).toBe(false);
  });

  it('rejects text that is not a number', () => {
    expect(() => countSignificantFigures('abc')).toThrow(expect.objectContaining({ code: 'invalid_number' }));
    expect(() => countSignificantFigures('.')).toThrow(CalcError);
  });

  it('classical view: product keeps the fewest significant figures of the measured inputs; exact numbers do not count [CP, METROLOGY §6.1]', () => {
    // 1000 mL/L is exact; 160.07 mg (5), 0.9995 (4), 100.0 mL (4) → 4 figures
    const r = significantFigureResult('1000.9906', ['160.07', '0.9995', '100.0', { value: '1000', exact: true }]);
    expect(r).toEqual({ value: '1001', significantFigures: 4, limitedBy: '0.9995' });
    expect(significantFigureResult('1000.9906', [{ value: '100', name: 'volume' }])).toEqual({
      value: '1e+3',
      significantFigures: 1,
      limitedBy: 'volume',
    });
    expect(() => significantFigureResult('1', [{ value: '1', exact: true }])).toThrow(expect.objectContaining({ code: 'missing_input' }));
  });
});

describe('GUM rounding (JCGM 100 §7.2.6)', () => {
  it('"1002.7 ± 1.7" from roundGUM(1002.700, 1.670) [C, METROLOGY Appendix A; QUAM A1 §6.2]', () => {
    const r = roundGUM('1002.700', '1.670');
    expect(r.value).toBe('1002.7');
    expect(r.uncertainty).toBe('1.7');
    expect(r.decimals).toBe(1);
    expect(`${r.value} ± ${r.uncertainty}`).toBe('1002.7 ± 1.7');
  });

  it('formatResult → "1002.7 ± 1.7 mg/L (k = 2)" [QUAM A1 illustration, METROLOGY §6.2]', () => {
    expect(formatResult('1002.700', '1.670', 'mg/L', '2')).toBe('1002.7 ± 1.7 mg/L (k = 2)');
  });

  it('trailing zeros are kept: 10.5 ± 0.1 → "10.50 ± 0.10"; 0.0996 rounds up to "0.10"', () => {
    expect(roundGUM('10.5', '0.1')).toMatchObject({ value: '10.50', uncertainty: '0.10', decimals: 2 });
    expect(roundGUM('5', '0.0996')).toMatchObject({ value: '5.00', uncertainty: '0.10', decimals: 2 });
    expect(roundGUM('1001', '2.6')).toMatchObject({ value: '1001.0', uncertainty: '2.6' });
  });

  it('tie rule applies to the value: 12.25 ± 0.15 → 12.2 (half-even) / 12.3 (half-up)', () => {
    expect(roundGUM('12.25', '0.15', { digits: 1, rule: 'half-even' }).value).toBe('12.2');
    expect(roundGUM('12.25', '0.15', { digits: 1, rule: 'half-up' }).value).toBe('12.3');
  });

  it('GUM allows rounding the uncertainty up: 10.47 → 11 [M, METROLOGY §6.2]', () => {
    expect(roundGUM('100.0', '10.47', { uncertaintyRounding: 'up' }).uncertainty).toBe('11');
    expect(roundGUM('100.0', '10.47').uncertainty).toBe('10');
  });

  it('one digit: QUAM rounds u = 0.865 to 0.9 [V-src, METROLOGY §5.3]', () => {
    expect(roundGUM('1002.7', '0.865', { digits: 1 })).toMatchObject({ value: '1002.7', uncertainty: '0.9' });
  });

  it('large uncertainty uses a common exponent instead of an ambiguous "12300 ± 1200"', () => {
    const r = roundGUM('12345', '1234');
    expect(r).toMatchObject({ value: '12.3e3', uncertainty: '1.2e3', decimals: -2, exponent: 3 });
    expect(formatResult('12345', '1234', 'µg/L')).toBe('(12.3 ± 1.2) × 10^3 µg/L (k = 2)');
  });

  it('zero or negative uncertainty → non_positive; bad digits → calc_out_of_range', () => {
    expect(() => roundGUM('1', '0')).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => roundGUM('1', '-1')).toThrow(expect.objectContaining({ code: 'non_positive' }));
    expect(() => roundGUM('1', '1', { digits: 3 as never })).toThrow(expect.objectContaining({ code: 'calc_out_of_range' }));
  });
});

describe('shownEstimate: the estimate as a record shows it, for messages', () => {
  it('rounds to the decimal position of U = 2u (GUM 7.2.6): 1003.8063975891223363 with u = 1.05 → 1003.8 [worked example, U = 2.1]', () => {
    expect(shownEstimate('1003.8063975891223363', '1.05')).toBe('1003.8');
    expect(shownEstimate('9.99812345', '0.0095')).toBe('9.998'); // U = 0.019 → three decimals
  });
  it('without an uncertainty, or when GUM rounding needs an exponent, gives 6 significant digits (common practice)', () => {
    expect(shownEstimate('1003.8063975891223363')).toBe('1003.81');
    expect(shownEstimate('1003.8063975891223363', null)).toBe('1003.81');
    expect(shownEstimate('123456.789', '600')).toBe('123457');
  });
});
