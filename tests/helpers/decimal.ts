/** Decimal-based comparison helpers for tests (no binary floats in the comparison). */
import { expect } from 'vitest';
import Decimal from 'decimal.js';
import { D, type Dec } from '../../shared/calc/decimal.ts';

export function dec(x: string | Dec): Dec {
  return new D(x);
}

/** Assert |actual − expected| ≤ tol (all as decimals). */
export function expectClose(actual: string | Dec, expected: string | Dec, tol: string | Dec): void {
  const a = new D(actual);
  const e = new D(expected);
  const diff = a.minus(e).abs();
  if (diff.gt(tol)) {
    expect.fail(`expected ${a.toString()} to be within ${new D(tol).toString()} of ${e.toString()} (difference ${diff.toString()})`);
  }
  expect(Decimal.isDecimal(a)).toBe(true);
}

/** Assert |actual/expected − 1| ≤ relTol. */
export function expectRelClose(actual: string | Dec, expected: string | Dec, relTol: string | Dec): void {
  const a = new D(actual);
  const e = new D(expected);
  const rel = a.div(e).minus(1).abs();
  if (rel.gt(relTol)) {
    expect.fail(`expected ${a.toString()} to be within relative ${new D(relTol).toString()} of ${e.toString()} (relative difference ${rel.toString()})`);
  }
}

/** Round to n decimals (half-even) and return the string, for exact comparisons against published digits. */
export function fixed(x: string | Dec, n: number): string {
  return new D(x).toFixed(n, Decimal.ROUND_HALF_EVEN);
}
