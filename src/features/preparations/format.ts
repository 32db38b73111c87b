/** Display helpers for preparation records. Values stay decimal strings; only arranged for reading. */
import { D } from '../../../shared/calc/decimal.ts';
import { PREPARATION_ID_RE } from '../../../shared/prep/identifiers.ts';
import type { Stage } from './types.ts';
import { labDateTime } from '../../../shared/prep/lab-time.ts';

/** "2026-03-07 14:02": the instant in the lab's time zone (24 h); the zone is stated once per page (shared/prep/lab-time.ts). */
export function formatLabTime(iso: string | null | undefined, timeZone: string | undefined): string {
  if (!iso) return '—';
  return labDateTime(iso, timeZone ?? 'UTC');
}

export const STAGE_LABELS: Record<Stage, string> = {
  planned: 'Planned',
  weighed: 'Weighed',
  made_up: 'Made up to volume',
  complete: 'Complete',
};

export function stageLabel(stage: string): string {
  return (STAGE_LABELS as Record<string, string>)[stage] ?? stage.replace(/_/g, ' ');
}

export function statusLabel(status: string): string {
  const s = status.replace(/_/g, ' ');
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** A whole preparation identifier such as "HWL-2026-0042" (what a scanner types before Enter). */
export function isPreparationIdentifier(text: string): boolean {
  return PREPARATION_ID_RE.test(text.trim().toUpperCase());
}

export function qty(q: { value: string; unit: string } | null | undefined): string {
  return q ? `${q.value} ${q.unit}` : '—';
}

/** Decimals a balance with readability d (mg) shows in mg ("0.1" → 1, "0.01" → 2, "10" → 0). */
export function balanceDecimals(readabilityMg: string | null | undefined, unit: 'mg' | 'g' = 'mg'): number | null {
  if (!readabilityMg) return null;
  try {
    const d = new D(readabilityMg);
    if (d.lte(0)) return null;
    return (unit === 'g' ? d.div(1000) : d).decimalPlaces();
  } catch {
    return null;
  }
}

/** Percent from a 0..1 fraction string (or already-percent values above 1), one decimal. */
export function percent(s: string | null | undefined, decimals = 1): string {
  if (!s) return '—';
  try {
    const x = new D(s);
    const pct = x.gt(1) ? x : x.mul(100);
    return `${pct.toDecimalPlaces(decimals).toFixed(decimals)} %`;
  } catch {
    return '—';
  }
}

/**
 * The name of a calculation version for the screen: "dilution-1 (METROLOGY §5.5: …)" → "calculation dilution-1".
 * The stored string keeps its internal references (it is part of the record); the screen shows none.
 */
export function calcVersionName(calcVersion: string): string {
  return `calculation ${calcVersion.replace(/\s*\(.*$/s, '').trim()}`;
}

/**
 * The expiry reason for the screen, said once: the stored reason starts "Expires on <date>, …" and the date is
 * already shown beside it. A record not yet made up was not "prepared": its date is the planned one.
 */
export function expiryReasonText(reason: string, notYetMadeUp: boolean): string {
  let r = reason.replace(/^Expires on \d{4}-\d{2}-\d{2},\s*/, '');
  if (notYetMadeUp) r = r.replace(/\bprepared (\d{4}-\d{2}-\d{2})/g, 'planned for $1').replace(/before the preparation date/g, 'before the planned date');
  return r.charAt(0).toUpperCase() + r.slice(1);
}
