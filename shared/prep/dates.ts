/**
 * Calendar dates as ISO 8601 strings ("YYYY-MM-DD"), for gates and expiry.
 * Dates are whole calendar days with no time zone; arithmetic is done on integer UTC day numbers,
 * so a DST change can never move a date. Resolving a date to an instant (end of day in the site
 * zone, REQUIREMENTS EX-08) is the caller's job.
 */
import { CalcError } from '../calc/errors.ts';

const ISO_DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;
const MS_PER_DAY = 86_400_000;

/** True when s is a real calendar date written YYYY-MM-DD (2026-02-29 is not). */
export function isIsoDate(s: unknown): s is string {
  if (typeof s !== 'string') return false;
  const m = ISO_DATE_RE.exec(s);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (mo < 1 || mo > 12 || d < 1) return false;
  const dt = new Date(0);
  dt.setUTCFullYear(y, mo - 1, d);
  return dt.getUTCFullYear() === y && dt.getUTCMonth() === mo - 1 && dt.getUTCDate() === d;
}

/** Integer day number (days since 1970-01-01) of a valid ISO date; throws CalcError otherwise. */
export function dayNumber(s: string, name = 'date'): number {
  if (!isIsoDate(s)) {
    throw new CalcError('invalid_number', `${name} "${String(s)}" is not a calendar date; enter it as YYYY-MM-DD, e.g. 2026-03-12`, {
      details: { input: name, received: s },
    });
  }
  const m = ISO_DATE_RE.exec(s)!;
  const dt = new Date(0);
  dt.setUTCFullYear(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  return Math.round(dt.getTime() / MS_PER_DAY);
}

function fromDayNumber(n: number): string {
  const dt = new Date(n * MS_PER_DAY);
  const y = String(dt.getUTCFullYear()).padStart(4, '0');
  const mo = String(dt.getUTCMonth() + 1).padStart(2, '0');
  const d = String(dt.getUTCDate()).padStart(2, '0');
  return `${y}-${mo}-${d}`;
}

/** date + days (days may be negative), as YYYY-MM-DD. */
export function addDays(date: string, days: number, name = 'date'): string {
  if (!Number.isInteger(days)) throw new CalcError('invalid_number', `days must be a whole number, got ${days}`);
  return fromDayNumber(dayNumber(date, name) + days);
}

/** Whole days from `from` to `to` (positive when `to` is later). */
export function daysBetween(from: string, to: string): number {
  return dayNumber(to, 'to') - dayNumber(from, 'from');
}

/** "1 day" / "3 days". */
export function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}
