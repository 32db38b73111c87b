import { describe, expect, it } from 'vitest';
import { checkReadingRange } from '../../../shared/prep/reading.ts';
import { outOfPlan } from '../../../shared/prep/plan-plausibility.ts';

// Our own rules (issue 16 §2): no display shows more than the balance's capacity (Max); a net reading is greater
// than zero; a result outside target / 2 … target × 2 is one the plan could not produce.
describe('checkReadingRange', () => {
  it('accepts readings up to the capacity, in mg and in g, and refuses beyond it', () => {
    expect(checkReadingRange('220000.0', 'mg', '220', { net: true })).toEqual({ ok: true });
    expect(checkReadingRange('220.0000', 'g', '220', { net: true })).toEqual({ ok: true });
    const over = checkReadingRange('99999999999999999999.0', 'mg', '220', { net: true, balanceIdentifier: 'BAL-A1' });
    expect(over).toMatchObject({ ok: false, code: 'above_capacity' });
    expect(over.ok === false && over.message).toMatch(/BAL-A1 weighs up to 220 g/);
    expect(checkReadingRange('220.0001', 'g', '220', { net: true })).toMatchObject({ ok: false, code: 'above_capacity' });
  });

  it('refuses a net reading of zero or below, and allows a negative reading by difference within the capacity', () => {
    expect(checkReadingRange('-160.07', 'mg', '82', { net: true })).toMatchObject({ ok: false, code: 'not_positive' });
    expect(checkReadingRange('0.00', 'mg', '82', { net: true })).toMatchObject({ ok: false, code: 'not_positive' });
    expect(checkReadingRange('-160.07', 'mg', '82', { net: false })).toEqual({ ok: true });
    expect(checkReadingRange('-90000.00', 'mg', '82', { net: false })).toMatchObject({ ok: false, code: 'above_capacity' });
  });

  it('leaves text that is not a plain decimal to the digits check', () => {
    expect(checkReadingRange('1e30', 'mg', '220', { net: true })).toEqual({ ok: true });
    expect(checkReadingRange('abc', 'mg', '220', { net: true })).toEqual({ ok: true });
  });
});

describe('outOfPlan', () => {
  const target = { value: '1000', unit: 'mg/L' };
  it('is null within target / 2 … target × 2 (inclusive) and for other units', () => {
    for (const value of ['500', '1000.8', '2000']) expect(outOfPlan({ value, unit: 'mg/L' }, target), value).toBeNull();
    expect(outOfPlan({ value: '9000', unit: 'mg/kg' }, target)).toBeNull();
  });
  it('names the displayed result and the target beyond them', () => {
    expect(outOfPlan({ value: '1.4581e20', unit: 'mg/L', display: '(1458.1 ± 2.1) × 10^17 mg/L' }, target)).toBe(
      'The result (1458.1 ± 2.1) × 10^17 mg/L is more than twice the target 1000 mg/L: the plan cannot produce it',
    );
    expect(outOfPlan({ value: '499.9', unit: 'mg/L' }, target)).toMatch(/less than half the target 1000 mg\/L/);
  });
});
