/** Display helpers for audit entries. Stored times are UTC; they are shown in the lab's time zone, named. */
import { AUDIT_ACTION_LABELS, AUDIT_ENTITY_LABELS } from '../../../shared/schemas/audit.ts';

/** "12 Mar 2026, 09:14:03.120" in `timeZone` (seconds and ms: audit order matters). */
export function formatAuditTime(iso: string, timeZone: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  try {
    return new Intl.DateTimeFormat('en-GB', {
      timeZone,
      day: '2-digit',
      month: 'short',
      year: 'numeric',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      fractionalSecondDigits: 3,
      hourCycle: 'h23',
    }).format(d);
  } catch {
    return iso;
  }
}

/** The zone's abbreviation at that moment, e.g. "GMT" or "BST" for Europe/London. */
export function zoneAbbreviation(iso: string, timeZone: string): string {
  try {
    const part = new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'short' })
      .formatToParts(new Date(iso))
      .find((p) => p.type === 'timeZoneName');
    return part?.value ?? timeZone;
  } catch {
    return timeZone;
  }
}

export const actionLabel = (action: string) => AUDIT_ACTION_LABELS[action] ?? action.replace(/_/g, ' ');
export const entityLabel = (entity: string) => AUDIT_ENTITY_LABELS[entity] ?? entity.replace(/_/g, ' ');

/** A recorded value exactly as stored: strings as they are (decimal strings keep their digits), null as "—". */
export function formatValue(value: unknown): string {
  if (value === null || value === undefined) return '—';
  if (typeof value === 'string') return value === '' ? '(empty)' : value;
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'number') return String(value);
  return JSON.stringify(value);
}
