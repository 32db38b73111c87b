import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import Decimal from 'decimal.js';
import {
  checkReadingDigits,
  decimalsOf,
  isInWindow,
  netFromDifference,
  netFromTare,
  readingWindow,
  typedDecimals,
} from '../../../shared/prep/reading.ts';
import { CalcError } from '../../../shared/calc/errors.ts';

describe('decimalsOf (common practice: the display shows the scale interval d)', () => {
  it.each([
    ['0.1', 'mg', 1],
    ['0.01', 'mg', 2],
    ['0.001', 'mg', 3],
    ['1', 'mg', 0],
    ['10', 'mg', 0],
    ['0.1', 'g', 4],
    ['0.01', 'g', 5],
    ['1', 'g', 3],
    ['10', 'g', 2],
    ['0.10', 'mg', 1],
  ] as const)('d = %s mg in %s -> %i decimals', (d, unit, n) => {
    expect(decimalsOf(d, unit)).toBe(n);
  });
  it('rejects a non-positive or non-numeric readability', () => {
    expect(() => decimalsOf('0')).toThrow(CalcError);
    expect(() => decimalsOf('abc')).toThrow(CalcError);
  });
});

describe('typedDecimals counts digits as typed (DEVELOPERS: "8.0" keeps its digits)', () => {
  it.each([
    ['0.1600', 4],
    ['160', 0],
    ['160.', 0],
    ['8.0', 1],
    ['.5', 1],
    ['1.5e-3', 4],
  ] as const)('%s -> %i', (s, n) => expect(typedDecimals(s)).toBe(n));
});

describe('checkReadingDigits', () => {
  it('accepts 0.1600 g and 160.0 mg on a 0.1 mg balance', () => {
    expect(checkReadingDigits('0.1600', 'g', '0.1', 'BAL-A1')).toEqual({ ok: true, decimals: 4 });
    expect(checkReadingDigits('160.0', 'mg', '0.1', 'BAL-A1')).toEqual({ ok: true, decimals: 1 });
    expect(checkReadingDigits('16.40', 'mg', '0.01', 'BAL-A1').ok).toBe(true);
    expect(checkReadingDigits('0.01640', 'g', '0.01', 'BAL-A1').ok).toBe(true);
  });
  it('asks for 4 decimals in g when trailing zeros are dropped (0.16 g on a 0.1 mg balance)', () => {
    expect(checkReadingDigits('0.16', 'g', '0.1', 'BAL-A1')).toEqual({
      ok: false,
      code: 'wrong_decimals',
      expectedDecimals: 4,
      message: 'BAL-A1 reads to 0.1 mg: enter the reading with 4 decimals in g, e.g. 0.1600',
    });
  });
  it('asks for 1 decimal in mg (160 mg on a 0.1 mg balance)', () => {
    const r = checkReadingDigits('160', 'mg', '0.1', 'BAL-A1');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toBe('BAL-A1 reads to 0.1 mg: enter the reading with 1 decimal in mg, e.g. 160.0');
  });
  it('refuses more digits than the balance shows (160.05 mg on a 0.1 mg balance)', () => {
    const r = checkReadingDigits('160.05', 'mg', '0.1');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toBe('The balance reads to 0.1 mg: enter the reading with 1 decimal in mg, e.g. 160.0');
  });
  it('whole-mg balance: no decimals in mg, 3 in g', () => {
    const r = checkReadingDigits('160.0', 'mg', '1', 'BAL-T1');
    if (!r.ok) expect(r.message).toBe('BAL-T1 reads to 1 mg: enter the reading with no decimals in mg, e.g. 160');
    expect(r.ok).toBe(false);
    expect(checkReadingDigits('0.160', 'g', '1').ok).toBe(true);
  });
  it('rejects exponent notation and text', () => {
    for (const s of ['1.6e-1', 'abc', '', '0,1600']) {
      const r = checkReadingDigits(s, 'g', '0.1', 'BAL-A1');
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.code).toBe('not_a_number');
    }
  });
});

describe('readingWindow (inward rounding to the scale interval; REQUIREMENTS OT-01 example)', () => {
  it('25.0 mg ± 5 % on a 0.1 mg balance -> 23.8 … 26.2 mg (exact 23.75 … 26.25, rounded inwards)', () => {
    const w = readingWindow('25.0', '5', '0.1');
    expect(w).toEqual({ low: '23.8', high: '26.2', decimals: 1 });
    // OT-01: 27.0 mg is flagged (outside); 25.0 inside
    expect(isInWindow('27.0', w)).toBe(false);
    expect(isInWindow('25.0', w)).toBe(true);
    // rounding never admits a reading outside the exact window: 23.7 (< 23.75) is out, 23.8 in
    expect(isInWindow('23.7', w)).toBe(false);
    expect(isInWindow('23.8', w)).toBe(true);
    expect(isInWindow('26.2', w)).toBe(true);
    expect(isInWindow('26.3', w)).toBe(false);
  });
  it('keeps exact bounds already on the grid: 100.00 mg ± 2 % on 0.01 mg -> 98.00 … 102.00 (arithmetic)', () => {
    expect(readingWindow('100.00', '2', '0.01')).toEqual({ low: '98.00', high: '102.00', decimals: 2 });
  });
  it('works for readings typed in g', () => {
    const w = readingWindow('160.0', '1', '0.1'); // 158.4 … 161.6 mg (arithmetic)
    expect(w).toMatchObject({ low: '158.4', high: '161.6' });
    expect(isInWindow('0.1584', w, 'g')).toBe(true);
    expect(isInWindow('0.1583', w, 'g')).toBe(false);
  });
  it('a non-decimal scale interval (d = 0.2 mg) gives multiples of d: 10.0 ± 5 % -> 9.6 … 10.4', () => {
    expect(readingWindow('10.0', '5', '0.2')).toMatchObject({ low: '9.6', high: '10.4' });
  });
  it('property: every grid reading is in the rounded window exactly when it is in the exact window', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1000, max: 10_000_000 }), fc.integer({ min: 0, max: 200 }), fc.integer({ min: -3000, max: 3000 }), (t, p10, off) => {
        const target = new Decimal(t).div(100).toFixed(2); // 0.01 mg grid
        const pct = new Decimal(p10).div(10).toString();
        const w = readingWindow(target, pct, '0.01');
        const r = new Decimal(target).plus(new Decimal(off).div(100));
        if (r.lte(0)) return;
        const half = new Decimal(target).times(pct).div(100);
        const exact = r.gte(new Decimal(target).minus(half)) && r.lte(new Decimal(target).plus(half));
        expect(isInWindow(r.toFixed(2), w)).toBe(exact);
      }),
    );
  });
  it('rejects a negative or ≥ 100 % tolerance', () => {
    expect(() => readingWindow('25.0', '-1', '0.1')).toThrow(CalcError);
    expect(() => readingWindow('25.0', '100', '0.1')).toThrow(CalcError);
  });
});

describe('net masses (common practice: weighing by difference and by tare)', () => {
  it('by difference: before − after, keeping the inputs’ decimals', () => {
    expect(netFromDifference('10.2345', '10.1200')).toBe('0.1145');
    expect(netFromDifference('10.2345', '10.12')).toBe('0.1145');
    expect(netFromDifference('25.1000', '25.0000')).toBe('0.1000');
    expect(netFromDifference('1523.4', '1498.0')).toBe('25.4');
  });
  it('by difference refuses a non-positive transfer (readings swapped)', () => {
    expect(() => netFromDifference('10.1200', '10.2345')).toThrow(CalcError);
    expect(() => netFromDifference('10.1200', '10.1200')).toThrow(/not less than/);
  });
  it('by tare: gross − tare, keeping decimals', () => {
    expect(netFromTare('35.6712', '35.5112')).toBe('0.1600');
    expect(netFromTare('160.0', '0.0')).toBe('160.0');
    expect(() => netFromTare('35.5112', '35.6712')).toThrow(CalcError);
  });
  it('property: result is exact and has max(decimals) digits', () => {
    fc.assert(
      fc.property(fc.bigInt({ min: 1n, max: 10n ** 12n }), fc.bigInt({ min: 0n, max: 10n ** 12n }), fc.integer({ min: 0, max: 6 }), (a, b, n) => {
        const scale = new Decimal(10).pow(n);
        const before = new Decimal((a + b).toString()).div(scale).toFixed(n);
        const after = new Decimal(b.toString()).div(scale).toFixed(n);
        const net = netFromDifference(before, after);
        expect(net).toBe(new Decimal(a.toString()).div(scale).toFixed(n));
        expect(typedDecimals(net)).toBe(n);
      }),
    );
  });
});
