/**
 * The metrology core's own Decimal constructor and input parsing.
 * Quantity: none (numeric infrastructure). Source: decimal.js 10 (arbitrary-precision decimal arithmetic).
 * Precision: 40 significant digits, ties to even. Units: none.
 * Measured values enter as decimal strings (as typed) or Dec, never as binary floats.
 */
import Decimal from 'decimal.js';
import { CalcError } from './errors.ts';

export const D = Decimal.clone({ precision: 40, rounding: Decimal.ROUND_HALF_EVEN });
export type Dec = Decimal;
/** A measured value as accepted by the core: a decimal string as typed, or a Dec. */
export type DecInput = string | Dec;

/** Decimal text: optional sign, digits with optional fraction, optional exponent ("1.5e-3"). */
export const DECIMAL_STRING_RE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function isDecInput(x: unknown): x is DecInput {
  return (typeof x === 'string' && DECIMAL_STRING_RE.test(x.trim())) || Decimal.isDecimal(x);
}

/**
 * Convert a decimal string or Dec to a Dec of the core's constructor (40 digits).
 * Throws CalcError('invalid_number') for anything else (including JS numbers, NaN and Infinity).
 */
export function toDec(x: DecInput | undefined | null, name = 'value'): Dec {
  if (x === undefined || x === null) {
    throw new CalcError('missing_input', `${name} is missing; enter a decimal number`, { details: { input: name } });
  }
  if (Decimal.isDecimal(x)) {
    if (!x.isFinite()) {
      throw new CalcError('invalid_number', `${name} must be a finite number, got ${x.toString()}`, {
        details: { input: name },
      });
    }
    return new D(x);
  }
  if (typeof x !== 'string') {
    throw new CalcError('invalid_number', `${name} must be given as a decimal string such as "10.0035"`, {
      details: { input: name },
    });
  }
  const s = x.trim();
  if (!DECIMAL_STRING_RE.test(s)) {
    throw new CalcError('invalid_number', `${name} "${x}" is not a decimal number; enter e.g. 10.0035 or 1.5e-3`, {
      details: { input: name, received: x },
    });
  }
  return new D(s);
}

/** Exact constant helper for numbers written in the code (defined constants, not measurements). */
export function c(s: string): Dec {
  return new D(s);
}
