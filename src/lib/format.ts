/** Display helpers. Values stay decimal strings; these only arrange them for reading. */
import { ROLE_LABELS, type Role } from '../../shared/schemas/roles.ts';
import { labDateTime } from '../../shared/prep/lab-time.ts';

/** "YYYY-MM-DD HH:mm" (24 h) in the lab's zone; the zone is stated once per page (shared/prep/lab-time.ts). */
export function formatDateTime(iso: string | null | undefined, timeZone?: string): string {
  if (!iso) return '—';
  return labDateTime(iso, timeZone ?? 'UTC');
}

/**
 * A date field written as the lab writes dates (YYYY-MM-DD): a text field, since a browser's date picker shows the
 * device's locale format (e.g. 12/05/2026), not the lab's convention. The server checks the date.
 */
export const ISO_DATE_INPUT = { type: 'text', inputMode: 'numeric', placeholder: 'YYYY-MM-DD', pattern: '\\d{4}-\\d{2}-\\d{2}', autoComplete: 'off', maxLength: 10 } as const;

export function roleLabel(role: string): string {
  return (ROLE_LABELS as Record<string, string>)[role] ?? role;
}

export { ROLE_LABELS, type Role };
