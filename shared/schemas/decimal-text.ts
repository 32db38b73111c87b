/**
 * Decimal strings as people and instruments write them ("8.0" keeps its digits).
 * The text is never converted to a JS number; range checks use decimal.js.
 */
import Decimal from 'decimal.js';
import { z } from 'zod';

export const DECIMAL_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export const decimalText = (message = 'Enter a number, e.g. 20.0') =>
  z.string({ error: message }).trim().regex(DECIMAL_TEXT, message);

/** A decimal string within [min, max] (inclusive); bounds are decimal strings too. */
export const decimalInRange = (min: string, max: string, message: string) =>
  decimalCheck((d) => d.gte(min) && d.lte(max), message);

/**
 * A decimal string that also passes `test`. zod 4 runs every check even after the regex fails, so the
 * refinement must not build a Decimal from text that is not a number (decimal.js would throw → 500).
 * `abort: true` stops at the first failure, so a malformed number reports only its format message.
 */
export const decimalCheck = (test: (d: Decimal) => boolean, message: string, format?: string) =>
  z
    .string({ error: format ?? 'Enter a number, e.g. 20.0' })
    .trim()
    .regex(DECIMAL_TEXT, { error: format ?? 'Enter a number, e.g. 20.0', abort: true })
    .refine((s) => DECIMAL_TEXT.test(s) && test(new Decimal(s)), message);
