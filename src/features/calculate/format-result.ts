/**
 * Display formatting for calculation results. The core returns full-precision decimal strings;
 * rounding happens only here, at the edge, with decimal.js (never binary floats).
 */
import { D } from '../../../shared/calc/decimal.ts';

function dec(s: string | undefined | null) {
  if (s === undefined || s === null || s === '') return null;
  try {
    return new D(s);
  } catch {
    return null;
  }
}

const SUP: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** n significant figures; plain notation between 1e-4 and 1e7, "1.23 × 10⁻⁵" outside. */
export function sig(s: string | undefined | null, n = 4): string {
  const x = dec(s);
  if (!x) return '—';
  if (x.isZero()) return '0';
  const r = x.toSignificantDigits(n);
  const e = r.abs().log(10).floor();
  if (e.gte(-4) && e.lt(7)) return r.toFixed(Math.max(0, n - 1 - e.toNumber()));
  const [m, ex] = r.toExponential(n - 1).split('e');
  const exp = (ex ?? '0').replace('+', '');
  return `${m} × 10${[...exp].map((ch) => SUP[ch] ?? ch).join('')}`;
}

/** Fixed number of decimals (for readings: the balance shows a fixed number of places). */
export function fixed(s: string | undefined | null, decimals: number): string {
  const x = dec(s);
  if (!x) return '—';
  return x.toFixed(decimals);
}

/** Number of decimals written in a typed reading, e.g. "159.910" → 3. */
export function decimalsOf(text: string): number {
  const m = /\.(\d+)/.exec(text.trim().split(/[eE]/)[0] ?? '');
  return m ? m[1]!.length : 0;
}

/** Share (0..1) as a CSS width and a label, computed in decimal. */
export function shareParts(s: string | undefined | null): { width: string; label: string } {
  const x = dec(s);
  if (!x) return { width: '0%', label: '—' };
  const pct = x.gt(1) ? x : x.mul(100); // accept 0..1 or already-percent values
  const clamped = D.min(D.max(pct, 0), 100);
  return { width: `${clamped.toDecimalPlaces(2).toString()}%`, label: `${pct.toDecimalPlaces(1).toFixed(1)} %` };
}

/** Two decimal strings are the same number (e.g. "1.50" and "1.5"). */
export function sameNumber(a: string | undefined | null, b: string | undefined | null): boolean {
  const x = dec(a);
  const y = dec(b);
  if (!x || !y) return a === b;
  return x.eq(y);
}
