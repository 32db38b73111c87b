/**
 * Balance readings as typed: how many decimals a balance shows, checking a typed reading against it,
 * the acceptance window around a target reading, and net masses from two readings.
 * Readings are decimal strings and are stored verbatim ("0.1600" keeps its zeros); nothing here
 * rewrites a reading, it only validates or derives new values. Arithmetic is decimal.js (shared/calc).
 */
import { D, toDec, type Dec } from '../calc/decimal.ts';
import { CalcError } from '../calc/errors.ts';

export type MassUnit = 'mg' | 'g';

/** Plain decimal text without exponent, as a balance display shows it. */
const PLAIN_DECIMAL_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

function positive(x: string, name: string): Dec {
  const d = toDec(x, name);
  if (d.lte(0)) {
    throw new CalcError('non_positive', `${name} must be greater than zero, got ${x}`, { details: { input: name } });
  }
  return d;
}

/**
 * Number of decimals a balance with readability d (in mg) shows, in mg or in g.
 * 0.1 mg -> 1 decimal in mg, 4 in g; 0.01 mg -> 2 in mg, 5 in g; 10 mg -> 0 in mg, 2 in g
 * (common practice: the display resolution equals the scale interval d).
 */
export function decimalsOf(readabilityMg: string, unit: MassUnit = 'mg'): number {
  const d = positive(readabilityMg, 'readabilityMg');
  return (unit === 'g' ? d.div(1000) : d).decimalPlaces();
}

/** Decimals of a number as typed: "0.1600" -> 4, "12" -> 0, "1.5e-3" -> 4 (exponent forms are normalised). */
export function typedDecimals(s: string): number {
  const t = s.trim();
  if (PLAIN_DECIMAL_RE.test(t)) {
    const dot = t.indexOf('.');
    return dot < 0 ? 0 : t.length - dot - 1;
  }
  return toDec(t).decimalPlaces();
}

export type ReadingDigitsCheck =
  | { ok: true; decimals: number }
  | { ok: false; code: 'not_a_number' | 'wrong_decimals'; expectedDecimals: number; message: string };

/**
 * Check that a typed reading has exactly the decimals the balance shows in the unit it was typed in.
 * Example message: "BAL-A1 reads to 0.1 mg: enter the reading with 4 decimals in g, e.g. 0.1600".
 * Only validates; the reading string is stored verbatim by the caller.
 */
export function checkReadingDigits(
  reading: string,
  unit: MassUnit,
  readabilityMg: string,
  balanceIdentifier = 'The balance',
): ReadingDigitsCheck {
  const expected = decimalsOf(readabilityMg, unit);
  const d = new D(readabilityMg).toString();
  const what = expected === 0 ? 'no decimals' : expected === 1 ? '1 decimal' : `${expected} decimals`;
  const t = typeof reading === 'string' ? reading.trim() : '';
  if (!PLAIN_DECIMAL_RE.test(t)) {
    const eg = new D(unit === 'g' ? '0.16' : '160').toFixed(expected);
    return {
      ok: false,
      code: 'not_a_number',
      expectedDecimals: expected,
      message: `"${String(reading)}" is not a balance reading: ${balanceIdentifier} reads to ${d} mg; enter the reading in ${unit} with ${what}, e.g. ${eg}`,
    };
  }
  const got = typedDecimals(t);
  if (got === expected) return { ok: true, decimals: got };
  const example = new D(t).toFixed(expected);
  return {
    ok: false,
    code: 'wrong_decimals',
    expectedDecimals: expected,
    message: `${balanceIdentifier} reads to ${d} mg: enter the reading with ${what} in ${unit}, e.g. ${example}`,
  };
}

export interface ReadingWindow {
  /** lowest acceptable reading, mg, with the balance's decimals */
  low: string;
  /** highest acceptable reading, mg, with the balance's decimals */
  high: string;
  decimals: number;
}

/**
 * Acceptance window target ± pct % in mg, written with the balance's decimals.
 * Rounded inwards (low up, high down) to the balance's scale interval: a reading the balance can show
 * lies in the rounded window exactly when it lies in the exact window, so the rounding never accepts a
 * reading outside target ± pct % nor rejects one inside it.
 * (REQUIREMENTS OT-01: target 25.0 mg ± 5 % -> 23.8 … 26.2 mg on a 0.1 mg balance.)
 */
export function readingWindow(targetReadingMg: string, pct: string, readabilityMg: string): ReadingWindow {
  const target = positive(targetReadingMg, 'targetReadingMg');
  const p = toDec(pct, 'pct');
  if (p.lt(0) || p.gte(100)) {
    throw new CalcError('calc_out_of_range', `pct must be from 0 to below 100 %, got ${pct}`, { details: { input: 'pct' } });
  }
  const step = positive(readabilityMg, 'readabilityMg');
  const decimals = step.decimalPlaces();
  const half = target.times(p).div(100);
  const lowExact = target.minus(half);
  const highExact = target.plus(half);
  // multiples of the scale interval d (d need not be a power of ten, e.g. 0.2 mg)
  const low = lowExact.div(step).toDecimalPlaces(0, D.ROUND_CEIL).times(step);
  const high = highExact.div(step).toDecimalPlaces(0, D.ROUND_FLOOR).times(step);
  return { low: low.toFixed(decimals), high: high.toFixed(decimals), decimals };
}

/** True when low ≤ reading ≤ high (inclusive). A reading typed in g is converted to mg first. */
export function isInWindow(reading: string, window: Pick<ReadingWindow, 'low' | 'high'>, unit: MassUnit = 'mg'): boolean {
  const r = toDec(reading, 'reading');
  const mg = unit === 'g' ? r.times(1000) : r;
  return mg.gte(toDec(window.low, 'window.low')) && mg.lte(toDec(window.high, 'window.high'));
}

function differenceKeepingDecimals(a: string, b: string, aName: string, bName: string, fault: string): string {
  const x = toDec(a, aName);
  const y = toDec(b, bName);
  const net = x.minus(y);
  if (net.lte(0)) {
    throw new CalcError('non_positive', fault.replace('{net}', net.toString()), { details: { input: bName } });
  }
  const decimals = Math.max(typedDecimals(a), typedDecimals(b));
  // the difference of two numbers with ≤ n decimals has ≤ n decimals, so toFixed only pads: exact
  return net.toFixed(decimals);
}

/**
 * Weighing by difference: mass transferred = reading before − reading after (same unit for both,
 * result in that unit), written with the larger number of decimals of the two readings.
 * "10.2345" − "10.1200" -> "0.1145". Throws CalcError('non_positive') if nothing was transferred.
 */
export function netFromDifference(before: string, after: string): string {
  return differenceKeepingDecimals(
    before,
    after,
    'before',
    'after',
    `The reading after transfer (${after}) is not less than the reading before (${before}); net {net}: check the order of the readings`,
  );
}

/**
 * Net by tare: net = gross − tare (same unit, result in that unit), with the larger number of decimals
 * of the two readings. Throws CalcError('non_positive') when gross ≤ tare.
 */
export function netFromTare(gross: string, tare: string): string {
  return differenceKeepingDecimals(
    gross,
    tare,
    'gross',
    'tare',
    `The gross reading (${gross}) is not greater than the tare (${tare}); net {net}: check the readings`,
  );
}

export type ReadingRangeCheck = { ok: true } | { ok: false; code: 'above_capacity' | 'not_positive'; message: string };

/**
 * Whether a typed reading can have come from the balance at all: no display shows more than the balance's
 * capacity (Max), in either direction, and a net reading (a direct weighing into a tared vessel, the net
 * readings of a dilution by mass) is the mass itself, so it is greater than zero. Readings by difference
 * may be negative (a vessel tared on the pan, then the material taken out), never beyond the capacity.
 * Text that is not a plain decimal passes here; checkReadingDigits refuses it.
 */
export function checkReadingRange(
  reading: string,
  unit: MassUnit,
  capacityG: string,
  opts: { net: boolean; balanceIdentifier?: string; what?: string },
): ReadingRangeCheck {
  const t = typeof reading === 'string' ? reading.trim() : '';
  if (!PLAIN_DECIMAL_RE.test(t)) return { ok: true };
  const r = new D(t);
  const who = opts.balanceIdentifier ?? 'The balance';
  const what = opts.what ?? 'The reading';
  if (opts.net && r.lte(0)) {
    return { ok: false, code: 'not_positive', message: `${what} is the mass itself and cannot be ${r.isZero() ? 'zero' : 'below zero'} (${t} ${unit}); weigh again` };
  }
  let capacity: Dec;
  try {
    capacity = toDec(capacityG, 'capacityG');
  } catch {
    return { ok: true }; // a balance without a usable capacity: nothing to compare with
  }
  const grams = unit === 'g' ? r.abs() : r.abs().div(1000);
  if (capacity.gt(0) && grams.gt(capacity)) {
    return {
      ok: false,
      code: 'above_capacity',
      message: `${who} weighs up to ${capacity.toString()} g: ${t} ${unit} cannot be one of its readings; check the reading and its unit`,
    };
  }
  return { ok: true };
}
