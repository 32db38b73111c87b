/**
 * Display helpers for the inventory pages. Measured values stay the decimal strings the server sent;
 * these helpers only arrange them (labels, units, date states) and never do arithmetic on them.
 */
import { CALIBRATION_DUE_SOON_DAYS } from '../../../shared/prep/gates.ts';
import { dayNumber, isIsoDate } from '../../../shared/prep/dates.ts';

/** Today's calendar date on this device, YYYY-MM-DD (the bench tablet is in the lab). */
export function todayIso(now: Date = new Date()): string {
  const y = String(now.getFullYear()).padStart(4, '0');
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `${y}-${m}-${d}`;
}

export type ExpiryState = 'none' | 'ok' | 'expired';

/** Usable on the expiry day itself, expired from the next day (same rule as shared/prep/gates.ts). */
export function expiryState(expiresOn: string | null, today = todayIso()): ExpiryState {
  if (!expiresOn || !isIsoDate(expiresOn)) return 'none';
  return dayNumber(expiresOn) < dayNumber(today) ? 'expired' : 'ok';
}

export type CalibrationState = 'unknown' | 'ok' | 'due_soon' | 'overdue';

/** Overdue after the due day; "due soon" within the gates' lead time (common practice, 14 days). */
export function calibrationState(dueOn: string | null, today = todayIso()): CalibrationState {
  if (!dueOn || !isIsoDate(dueOn)) return 'unknown';
  const days = dayNumber(dueOn) - dayNumber(today);
  if (days < 0) return 'overdue';
  if (days <= CALIBRATION_DUE_SOON_DAYS) return 'due_soon';
  return 'ok';
}

/** "2026-03-12" → "12 Mar 2026"; anything else is shown as sent. */
export function formatDate(iso: string | null | undefined): string {
  if (!iso) return '—';
  if (!isIsoDate(iso)) return iso;
  const [y, m, d] = iso.split('-');
  const month = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'][Number(m) - 1];
  return `${Number(d)} ${month} ${y}`;
}

export const STATUS_LABELS: Record<string, string> = {
  accepted: 'Accepted',
  quarantined: 'Quarantined',
  retired: 'Retired',
  in_service: 'In service',
  out_of_service: 'Out of service',
};

export const GRADE_LABELS: Record<string, string> = { CRM: 'CRM', RM: 'RM', reagent: 'Reagent' };

export const WARE_KIND_LABELS: Record<string, string> = {
  volumetric_flask: 'Volumetric flask',
  bulb_pipette: 'Bulb pipette',
  graduated_pipette: 'Graduated pipette',
  piston_pipette: 'Piston pipette',
};

export const WARE_CLASS_LABELS: Record<string, string> = { A: 'Class A', B: 'Class B', 'n/a': 'n/a' };

export function label(map: Record<string, string>, key: string | null | undefined): string {
  if (key === null || key === undefined || key === '') return '—';
  return map[key] ?? key;
}

/** Bytes as people read them: 1 kB = 1000 B. */
export function formatBytes(n: number): string {
  if (!Number.isFinite(n) || n < 0) return '—';
  if (n < 1000) return `${n} B`;
  if (n < 1_000_000) return `${(n / 1000).toFixed(1)} kB`;
  return `${(n / 1_000_000).toFixed(2)} MB`;
}

/** Purity as written on the certificate: "0.9995 ± 0.0004 (k = 2)" or "0.9995 (u = 0.0002)". */
export function formatPurity(p: { value: string; expandedUncertainty: string | null; k: string | null; standardUncertainty: string | null }): string {
  if (p.expandedUncertainty) return `${p.value} ± ${p.expandedUncertainty}${p.k ? ` (k = ${p.k})` : ''}`;
  if (p.standardUncertainty) return `${p.value} (u = ${p.standardUncertainty})`;
  return p.value;
}
