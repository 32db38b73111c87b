/**
 * Rounding and significant figures on decimal strings (never binary floats).
 * Source: tie rules: half-even per ISO 80000-1 Annex B / ASTM E29, half-up per USP General Notices 7.20;
 * result rounding per JCGM 100:2008 (GUM) 7.2.6: uncertainty to at most two significant digits,
 * estimate to the same decimal position; classical significant-figure rules for products/quotients.
 * Validity: any finite decimal. Units: unchanged (strings carry no unit except in formatResult).
 */
import Decimal from 'decimal.js';
import { D, type Dec, type DecInput, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';

export type RoundingRule = 'half-even' | 'half-up';

function mode(rule: RoundingRule): Decimal.Rounding {
  if (rule === 'half-even') return Decimal.ROUND_HALF_EVEN;
  if (rule === 'half-up') return Decimal.ROUND_HALF_UP;
  throw new CalcError('calc_out_of_range', `Unknown rounding rule "${String(rule)}"; use half-even or half-up`);
}

/** Plain (non-exponential) decimal text of x. */
export function toPlainString(x: DecInput): string {
  return toDec(x).toFixed();
}

/**
 * Round to `places` decimals (may be negative: −2 rounds to hundreds); trailing zeros are kept,
 * e.g. roundToDecimals('2.5', 2) = "2.50".
 */
export function roundToDecimals(x: DecInput, places: number, rule: RoundingRule = 'half-even'): string {
  const d = toDec(x);
  checkInt(places, 'places', -100, 100);
  if (places >= 0) return d.toFixed(places, mode(rule));
  const scale = new D(10).pow(-places);
  return d.div(scale).toDecimalPlaces(0, mode(rule)).mul(scale).toFixed(0);
}

/**
 * Round to n significant figures, e.g. ("0.0012345", 3) → "0.00123", ("2.000", 2) → "2.0".
 * When the rounded value is a whole number ending in zero ("1200", "100"), exponent notation is used
 * ("1234.5", 2 → "1.2e+3"; "99.96", 3 → "1.00e+2") so the string is never ambiguous.
 */
export function roundToSignificant(x: DecInput, n: number, rule: RoundingRule = 'half-even'): string {
  const d = toDec(x);
  checkInt(n, 'significant figures', 1, 100);
  if (d.isZero()) return n > 1 ? `0.${'0'.repeat(n - 1)}` : '0';
  const r = d.toSignificantDigits(n, mode(rule));
  const e = r.e; // exponent of the leading digit after rounding
  const decimals = n - 1 - e;
  if (decimals > 0) return r.toFixed(decimals);
  const whole = r.toFixed(0);
  // a whole number ending in 0 would hide which zeros are significant ("100"): use exponent notation
  if (decimals === 0 && !whole.endsWith('0')) return whole;
  return r.toExponential(n - 1);
}

function checkInt(n: number, name: string, lo: number, hi: number): void {
  if (!Number.isInteger(n) || n < lo || n > hi) {
    throw new CalcError('calc_out_of_range', `${name} must be a whole number from ${lo} to ${hi} (got ${String(n)})`);
  }
}

interface Parsed {
  neg: boolean;
  intDigits: string;
  fracDigits: string;
  exp: number;
}

function parseTyped(s: string): Parsed {
  const t = typeof s === 'string' ? s.trim() : '';
  const m = /^([+-])?(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(t);
  if (!m || (m[2] === '' && (m[3] === undefined || m[3] === ''))) {
    throw new CalcError('invalid_number', `"${String(s)}" is not a decimal number as typed, e.g. 100.0`);
  }
  return { neg: m[1] === '-', intDigits: m[2], fracDigits: m[3] ?? '', exp: m[4] ? parseInt(m[4], 10) : 0 };
}

/**
 * Significant figures of a number as typed: leading zeros never count; trailing zeros count when a
 * decimal point is present ("100.0" → 4, "0.0050" → 2); trailing zeros of a whole number without a
 * point are taken as not significant ("1200" → 2, ambiguous). Exponent notation: mantissa digits.
 * An all-zero value counts its written decimals ("0.00" → 2, "0" → 1).
 */
export function countSignificantFigures(typed: string): number {
  const p = parseTyped(typed);
  const hasPoint = typeof typed === 'string' && typed.includes('.');
  const all = (p.intDigits + p.fracDigits).replace(/^0+/, '');
  if (all === '') return Math.max(1, p.fracDigits.length);
  if (hasPoint) return all.length;
  return all.replace(/0+$/, '').length;
}

/** Whether a typed whole number has trailing zeros whose significance is unknown ("1200"). */
export function isSignificanceAmbiguous(typed: string): boolean {
  const p = parseTyped(typed);
  return !typed.includes('.') && /[1-9]\d*0$/.test(p.intDigits.replace(/^0+/, ''));
}

/** Decimal position of the last typed digit: "100.0" → 1, "160.07" → 2, "1.20e3" → −1, "100" → 0. */
export function countDecimalPlaces(typed: string): number {
  const p = parseTyped(typed);
  return p.fracDigits.length - p.exp;
}

/** One unit in the last typed digit: "160.07" → 0.01, "100" → 1, "1.5e-3" → 0.0001. */
export function lastDigitUnit(typed: string): Dec {
  return new D(10).pow(-countDecimalPlaces(typed));
}

export interface GumRounded {
  value: string;
  uncertainty: string;
  /** decimal position of the last kept digit (negative: left of the point) */
  decimals: number;
  /** set when decimals < 0: both strings are written as mantissa·10^exponent with this exponent */
  exponent?: number;
  valueMantissa?: string;
  uncertaintyMantissa?: string;
}

export interface GumRoundOptions {
  /** significant digits of the uncertainty: 1 or 2 (default 2) */
  digits?: 1 | 2;
  /** tie rule for the estimate and (when uncertaintyRounding is "nearest") the uncertainty */
  rule?: RoundingRule;
  /** "nearest" (default) or "up" (GUM 7.2.6 allows rounding the uncertainty up) */
  uncertaintyRounding?: 'nearest' | 'up';
}

/**
 * GUM 7.2.6 rounding: uncertainty to `digits` significant digits, value to the same decimal position.
 * Trailing zeros are kept ("10.50 ± 0.10"). If the uncertainty's last digit is left of the decimal
 * point, both are written with a common exponent ("12.3e3", "1.2e3") instead of an ambiguous "12300".
 */
export function roundGUM(value: DecInput, expandedU: DecInput, opts: GumRoundOptions = {}): GumRounded {
  const digits = opts.digits ?? 2;
  if (digits !== 1 && digits !== 2) throw new CalcError('calc_out_of_range', `Uncertainty digits must be 1 or 2 (got ${String(digits)})`);
  const rule = opts.rule ?? 'half-even';
  const y = toDec(value, 'value');
  const U = toDec(expandedU, 'uncertainty');
  if (U.lte(0)) {
    throw new CalcError('non_positive', `The uncertainty must be greater than zero to round by the GUM rule (got ${U.toString()})`);
  }
  const rm = opts.uncertaintyRounding === 'up' ? Decimal.ROUND_UP : mode(rule);
  const Ur = U.toSignificantDigits(digits, rm);
  const decimals = digits - 1 - Ur.e;
  if (decimals >= 0) {
    return { value: y.toFixed(decimals, mode(rule)), uncertainty: Ur.toFixed(decimals), decimals };
  }
  const exponent = Ur.e;
  const scale = new D(10).pow(exponent);
  const places = digits - 1;
  const valueMantissa = y.div(scale).toFixed(places, mode(rule));
  const uncertaintyMantissa = Ur.div(scale).toFixed(places);
  return {
    value: `${valueMantissa}e${exponent}`,
    uncertainty: `${uncertaintyMantissa}e${exponent}`,
    decimals,
    exponent,
    valueMantissa,
    uncertaintyMantissa,
  };
}

/** "1002.7 ± 1.7 mg/L (k = 2)"; large uncertainties: "(12.3 ± 1.2) × 10^3 mg/L (k = 2)". */
export function formatResult(value: DecInput, expandedU: DecInput, unit: string, k: DecInput = '2', opts: GumRoundOptions = {}): string {
  const r = roundGUM(value, expandedU, opts);
  const kText = toDec(k, 'coverage factor k').toString();
  const unitText = unit ? ` ${unit}` : '';
  if (r.exponent !== undefined) {
    return `(${r.valueMantissa} ± ${r.uncertaintyMantissa}) × 10^${r.exponent}${unitText} (k = ${kText})`;
  }
  return `${r.value} ± ${r.uncertainty}${unitText} (k = ${kText})`;
}

export type TypedInput = string | { value: string; exact?: boolean; name?: string };

export interface SigFigResult {
  value: string;
  significantFigures: number;
  /** the measured input with the fewest significant figures (its name, or the text as typed) */
  limitedBy?: string;
}

/**
 * Classical significant-figure view of a product/quotient: keep as many significant figures as the
 * measured input with the fewest. Exact numbers (counts, defined factors) are marked exact and ignored.
 */
export function significantFigureResult(value: DecInput, inputsAsTyped: TypedInput[], rule: RoundingRule = 'half-even'): SigFigResult {
  let best: number | undefined;
  let limitedBy: string | undefined;
  for (const inp of inputsAsTyped) {
    const o = typeof inp === 'string' ? { value: inp } : inp;
    if ('exact' in o && o.exact) continue;
    const n = countSignificantFigures(o.value);
    if (best === undefined || n < best) {
      best = n;
      limitedBy = ('name' in o && o.name) || o.value;
    }
  }
  if (best === undefined) {
    throw new CalcError('missing_input', 'Give at least one measured (non-exact) input to count significant figures');
  }
  return { value: roundToSignificant(value, best, rule), significantFigures: best, limitedBy };
}

/**
 * A result's estimate as a record shows it, for messages: rounded to the decimal position of its expanded
 * uncertainty (GUM 7.2.6 via roundGUM, U = k·u), or to 6 significant digits when no uncertainty is known or
 * the rounding would need an exponent. "1003.8063975891223363" with u = 1.05 → "1003.8".
 */
export function shownEstimate(value: DecInput, standardUncertainty?: DecInput | null, k: DecInput = '2'): string {
  const y = toDec(value, 'value');
  if (standardUncertainty !== undefined && standardUncertainty !== null && standardUncertainty !== '') {
    const U = toDec(standardUncertainty, 'uncertainty').mul(toDec(k, 'coverage factor k'));
    if (U.gt(0)) {
      const r = roundGUM(y, U);
      if (r.exponent === undefined) return r.value;
    }
  }
  return y.toSignificantDigits(6).toString();
}
