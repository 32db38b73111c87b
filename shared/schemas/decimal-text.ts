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
  decimalText().refine((s) => {
    const d = new Decimal(s);
    return d.gte(min) && d.lte(max);
  }, message);
