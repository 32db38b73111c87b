/**
 * Dates and times as printed: ISO 8601 dates (unambiguous, REQUIREMENTS LB-09) and date-times in the lab
 * time zone with the zone's abbreviation and UTC offset, e.g. "2026-11-18 13:42 GMT (UTC+00:00)".
 */
import Decimal from 'decimal.js';
import { DECIMAL_TEXT } from '../../shared/schemas/decimal-text.ts';
import { labDate, labDateTime as sharedLabDateTime, utcOffset, zoneAbbreviation } from '../../shared/prep/lab-time.ts';

/** "YYYY-MM-DD" of an instant in the lab's time zone (shared/prep/lab-time.ts). */
export function labDay(iso: string, timeZone: string): string {
  return labDate(iso, timeZone);
}

/** "YYYY-MM-DD HH:MM <zone> (UTC±hh:mm)" in the lab's time zone: a printed time names its zone (a sheet leaves the lab). */
export function labDateTime(iso: string, timeZone: string): string {
  return `${sharedLabDateTime(iso, timeZone)} ${zoneAbbreviation(timeZone, iso)} (${utcOffset(timeZone, iso)})`;
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
