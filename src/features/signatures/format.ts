/** Display helpers for signatures and record status. Times are stored in UTC and shown in the lab zone. */
import type { PreparationDetail, PreparationStatus } from '../../../shared/schemas/preparations.ts';
import { labDateTime, zoneAbbreviation } from '../../../shared/prep/lab-time.ts';

/** Statuses in which the record carries a live "prepared" signature: any data change amends it. */
export const SIGNED_STATUSES: readonly string[] = ['prepared', 'returned', 'verified'];

export function isSigned(d: Pick<PreparationDetail, 'status'>): boolean {
  return SIGNED_STATUSES.includes(d.status);
}

export const STATUS_TEXT: Record<string, { label: string; hint: string }> = {
  planned: { label: 'Planned', hint: 'not signed yet' },
  prepared: { label: 'Prepared', hint: 'signed by the preparer, awaiting verification' },
  verified: { label: 'Verified', hint: 'second-person review signed' },
  returned: { label: 'Returned', hint: 'returned to the preparer with a reason' },
  discarded: { label: 'Discarded', hint: 'withdrawn from use' },
  expired: { label: 'Expired', hint: 'past its expiry date' },
  seal_broken: { label: 'Seal broken', hint: 'its stored data no longer match its signatures; do not use it, QA must investigate' },
};

export function statusText(status: PreparationStatus | string): { label: string; hint: string } {
  return STATUS_TEXT[status] ?? { label: status.charAt(0).toUpperCase() + status.slice(1).replace(/_/g, ' '), hint: '' };
}

/**
 * A signature time as the manifestation shows it (REQUIREMENTS ES-01, TS-02): the instant in the lab's zone with the
 * zone named, and the same instant in UTC, both ISO with 24 h seconds. "2026-11-09 09:21:14 GMT" / "2026-11-09 09:21:14 UTC".
 */
export function signatureTime(iso: string, timeZone: string | undefined): { local: string; zone: string; utc: string } {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return { local: iso, zone: timeZone ?? 'UTC', utc: iso };
  const zone = timeZone ?? 'UTC';
  return { local: `${labDateTime(d, zone, { seconds: true })} ${zoneAbbreviation(zone, d)}`, zone, utc: `${labDateTime(d, 'UTC', { seconds: true })} UTC` };
}

/** The first 12 hex digits of a SHA-256, grouped for reading aloud ("3f2a 9c01 be77"). */
export function shortHash(hash: string): string {
  const h = hash.slice(0, 12);
  return h.replace(/(.{4})(?=.)/g, '$1 ');
}
