/**
 * May a working standard be made from this parent? Only from a verified, in-date record with a result
 * (REQUIREMENTS §0.1 principle 5: inputs are chosen only from released, unexpired items). The server
 * enforces the same rule; the client explains it before the chemist fills the form.
 */
import type { PreparationDetail } from '../preparations/types.ts';
import type { LineageSection } from './types.ts';
import { labDate } from '../../../shared/prep/lab-time.ts';

export type ParentConcentration = { value: string; unit: string; standardUncertainty: string; display: string };

/**
 * A parent's concentration as the server uses it (lineage-view concentrationOf): a stock's result, a volumetric
 * dilution's result, a gravimetric dilution's mass concentration; null for a mix or before a result exists.
 */
export function parentConcentration(d: PreparationDetail): ParentConcentration | null {
  const l = d as PreparationDetail & Partial<LineageSection>;
  if (l.kind === 'mix') return null;
  const c = d.result?.concentration ?? l.dilution?.result ?? l.gravimetric?.result?.massConcentration ?? null;
  return c ? { value: c.value, unit: c.unit, standardUncertainty: c.standardUncertainty, display: c.display } : null;
}

/** Today's calendar date in the lab's time zone, YYYY-MM-DD (shared/prep/lab-time.ts). */
export function labToday(timeZone: string | undefined, now: Date = new Date()): string {
  return labDate(now, timeZone ?? 'UTC');
}

/** Why a dilution cannot be made from `d` today, or null when it can. */
export function parentRefusal(d: PreparationDetail, today: string): string | null {
  if (d.status !== 'verified') {
    return `${d.identifier} is ${d.status === 'planned' ? 'not yet signed' : `'${d.status}'`}: only a verified standard can be diluted. It must be signed "prepared" and then verified by a second chemist.`;
  }
  if (d.expiry.expiresOn < today) return `${d.identifier} expired on ${d.expiry.expiresOn}; an expired standard cannot be diluted.`;
  if ((d as PreparationDetail & Partial<LineageSection>).kind === 'mix') return `${d.identifier} is a mix: a mix cannot be used as a parent yet.`;
  if (!parentConcentration(d)) return `${d.identifier} has no computed concentration yet.`;
  return null;
}
