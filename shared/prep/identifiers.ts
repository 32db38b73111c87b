/**
 * Preparation identifiers: PREFIX-YYYY-NNNN, e.g. "HWL-2026-0042".
 * The prefix is 2–6 upper-case letters (A–Z) set per laboratory; the sequence is zero-padded to
 * 4 digits and simply grows past 9999 ("HWL-2026-10000"). Issuing the next number (unique, never
 * reused, REQUIREMENTS TR-01) is the server's job; this module only formats, parses and validates.
 * Format choice: common practice (prefix, year, running number), not taken from a standard.
 */
import { z } from 'zod';

export const PREFIX_RE = /^[A-Z]{2,6}$/;
/** Canonical identifier: no leading zeros beyond the 4-digit padding. */
export const PREPARATION_ID_RE = /^([A-Z]{2,6})-(\d{4})-(\d{4}|[1-9]\d{4,})$/;
/** Calibration series identifier: prefix, year, "S", running number of at least 3 digits, e.g. "HWL-2026-S001". */
export const SERIES_ID_RE = /^[A-Z][A-Z0-9]{1,7}-\d{4}-S\d{3,}$/;

export interface PreparationId {
  prefix: string;
  year: number;
  seq: number;
}

export type PrefixCheck = { ok: true } | { ok: false; message: string };

export function validatePrefix(prefix: unknown): PrefixCheck {
  if (typeof prefix === 'string' && PREFIX_RE.test(prefix)) return { ok: true };
  return {
    ok: false,
    message: `The identifier prefix must be 2 to 6 upper-case letters A–Z, e.g. HWL; got "${String(prefix)}"`,
  };
}

export function isValidPrefix(prefix: unknown): prefix is string {
  return validatePrefix(prefix).ok;
}

/** zod schema for a prefix field (settings form and API). */
export const preparationPrefixSchema = z
  .string()
  .regex(PREFIX_RE, 'The identifier prefix must be 2 to 6 upper-case letters A–Z, e.g. HWL');

/**
 * "HWL", 2026, 42 -> "HWL-2026-0042"; 12345 -> "HWL-2026-12345".
 * Throws RangeError for an invalid prefix, a year outside 1000–9999 or a sequence that is not a
 * positive safe integer (these are programming errors: the server supplies all three).
 */
export function formatPreparationId(prefix: string, year: number, seq: number): string {
  const p = validatePrefix(prefix);
  if (!p.ok) throw new RangeError(p.message);
  if (!Number.isInteger(year) || year < 1000 || year > 9999) {
    throw new RangeError(`The year must be a 4-digit whole number, got ${year}`);
  }
  if (!Number.isSafeInteger(seq) || seq < 1) {
    throw new RangeError(`The sequence number must be a whole number ≥ 1, got ${seq}`);
  }
  return `${prefix}-${year}-${String(seq).padStart(4, '0')}`;
}

/**
 * Parse a canonical identifier; undefined for anything else (lower case, missing padding,
 * extra zeros such as "HWL-2026-00042", sequence 0, surrounding text).
 * parsePreparationId(formatPreparationId(p, y, n)) returns { p, y, n } and the reverse holds too.
 */
export function parsePreparationId(s: string): PreparationId | undefined {
  if (typeof s !== 'string') return undefined;
  const m = PREPARATION_ID_RE.exec(s);
  if (!m) return undefined;
  const year = Number(m[2]);
  const seq = Number(m[3]);
  if (year < 1000 || seq < 1 || !Number.isSafeInteger(seq)) return undefined;
  return { prefix: m[1]!, year, seq };
}
