/**
 * How a calibrated volume (the mean at 20 °C of a verified volume check, u = U/k) is named and written in a budget,
 * on the record page and on the prep sheet. Shared so the screen and the PDF say the same.
 */
import { D } from '../calc/decimal.ts';
import type { CalibratedVolume } from '../schemas/inventory.ts';

/** The mean written to the decimals of u at two significant digits (GUM 7.2.6 writes u with at most two). */
export function calibratedVolumeShown(cv: Pick<CalibratedVolume, 'meanMl' | 'standardUncertaintyMl'>): string {
  const u = new D(cv.standardUncertaintyMl);
  if (u.isZero()) return cv.meanMl;
  const decimals = Math.max(0, 1 - u.toSignificantDigits(2).e);
  return new D(cv.meanMl).toDecimalPlaces(decimals, D.ROUND_HALF_EVEN).toFixed(decimals);
}

/** An uncertainty at two significant digits, rounded up (GUM 7.2.6; rounding up is common practice). */
export function twoDigits(x: string): string {
  const u = new D(x);
  if (u.isZero()) return '0';
  const r = u.toSignificantDigits(2, D.ROUND_UP);
  return r.toFixed(Math.max(0, 1 - r.e));
}

/** "Flask volume, calibrated (VC-2026-0001): mean 100.0120 mL at 20 °C, u = U/k = 0.016 mL/2" */
export function calibratedVolumeLabel(what: 'Flask volume' | 'Aliquot volume' | 'Final volume', cv: CalibratedVolume): string {
  return `${what}, calibrated (${cv.checkIdentifier}): mean ${calibratedVolumeShown(cv)} mL at 20 °C, u = U/k = ${twoDigits(cv.expandedUncertaintyMl)} mL/${cv.k}`;
}

/** One line for the record page and the prep sheet. */
export function calibratedVolumeLine(identifier: string, cv: CalibratedVolume): string {
  return `${identifier}: calibrated volume ${calibratedVolumeShown(cv)} mL at 20 °C, u = ${twoDigits(cv.standardUncertaintyMl)} mL (U = ${twoDigits(cv.expandedUncertaintyMl)} mL, k = ${cv.k}) from volume check ${cv.checkIdentifier}, verified ${cv.verifiedOn}, next due ${cv.nextDueOn}`;
}
