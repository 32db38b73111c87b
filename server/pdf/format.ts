/**
 * Dates and times as printed: ISO 8601 dates (unambiguous, REQUIREMENTS LB-09) and date-times in the lab
 * time zone with the zone's abbreviation and UTC offset, e.g. "2026-11-18 13:42 GMT (UTC+00:00)".
 */
import Decimal from 'decimal.js';
import { DECIMAL_TEXT } from '../../shared/schemas/decimal-text.ts';

function parts(at: Date, timeZone: string, extra: Intl.DateTimeFormatOptions) {
  const p = new Intl.DateTimeFormat('en-GB', { timeZone, hourCycle: 'h23', ...extra }).formatToParts(at);
  return (t: string) => p.find((x) => x.type === t)?.value ?? '';
}

/** "YYYY-MM-DD" of an instant in the lab's time zone. */
export function labDay(iso: string, timeZone: string): string {
  const get = parts(new Date(iso), timeZone, { year: 'numeric', month: '2-digit', day: '2-digit' });
  return `${get('year')}-${get('month')}-${get('day')}`;
}

/** "YYYY-MM-DD HH:MM <zone> (UTC±hh:mm)" in the lab's time zone. */
export function labDateTime(iso: string, timeZone: string): string {
  const at = new Date(iso);
  const get = parts(at, timeZone, { year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', timeZoneName: 'short' });
  const offset = parts(at, timeZone, { timeZoneName: 'longOffset' })('timeZoneName').replace('GMT', 'UTC') || 'UTC';
  return `${get('year')}-${get('month')}-${get('day')} ${get('hour')}:${get('minute')} ${get('timeZoneName')} (${offset === 'UTC' ? 'UTC+00:00' : offset})`;
}

/** A decimal string shown with at most `places` decimals, half-even (display only; stored values keep full precision). */
export function shortDecimal(value: string, places: number): string {
  if (!DECIMAL_TEXT.test(value)) return value;
  const d = new Decimal(value);
  return d.decimalPlaces() <= places ? value : d.toFixed(places, Decimal.ROUND_HALF_EVEN);
}

/** A fraction as a percentage with `places` decimals, e.g. "0.3857" → "38.6 %" (display only). */
export function percent(fraction: string, places = 1): string {
  if (!DECIMAL_TEXT.test(fraction)) return fraction;
  return `${new Decimal(fraction).times(100).toFixed(places, Decimal.ROUND_HALF_EVEN)} %`;
}
