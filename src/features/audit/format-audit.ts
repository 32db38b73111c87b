/** Display helpers for audit entries. Stored times are UTC; they are shown in the lab's time zone, named. */
import { AUDIT_ACTION_LABELS, AUDIT_ENTITY_LABELS } from '../../../shared/schemas/audit.ts';
import { labDateTime, zoneAbbreviation as zoneAbbreviationAt } from '../../../shared/prep/lab-time.ts';

/** "2026-03-12 09:14:03.120" in `timeZone` (seconds and ms: audit order matters; shared/prep/lab-time.ts). */
export function formatAuditTime(iso: string, timeZone: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return `${labDateTime(d, timeZone, { seconds: true })}.${String(d.getUTCMilliseconds()).padStart(3, '0')}`;
}

/** The zone's abbreviation at that moment, e.g. "GMT" or "BST" for Europe/London. */
export function zoneAbbreviation(iso: string, timeZone: string): string {
  return zoneAbbreviationAt(timeZone, iso);
}

export const actionLabel = (action: string) => AUDIT_ACTION_LABELS[action] ?? action.replace(/_/g, ' ');
export const entityLabel = (entity: string) => AUDIT_ENTITY_LABELS[entity] ?? entity.replace(/_/g, ' ');

/**
 * A recorded value for the screen: strings exactly as stored (decimal strings keep their digits), null as "—",
 * lists joined ("(none)" when empty), records as "name: value; …" in words, never raw JSON.
 */
export function formatValue(value: unknown): string {
  if (value === null || value === undefined) return '—';
  if (typeof value === 'string') return value === '' ? '(empty)' : value;
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'number') return String(value);
  if (Array.isArray(value)) return value.length === 0 ? '(none)' : value.map((v) => (v !== null && typeof v === 'object' && !Array.isArray(v) ? `(${formatValue(v)})` : formatValue(v))).join(', ');
  if (typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>);
    return entries.length === 0 ? '(none)' : entries.map(([k, v]) => `${fieldWords(k)}: ${formatValue(v)}`).join('; ');
  }
  return String(value);
}

/** Unit suffixes of stored field names (after splitting into words), as the screen writes them. */
const UNIT_SUFFIX: Array<[RegExp, string]> = [
  [/ temperature c$/, ' temperature (°C)'],
  [/ g per ml$/, ' (g/mL)'],
  [/ h ?pa$/, ' (hPa)'],
  [/ mg$/, ' (mg)'],
  [/ ml$/, ' (mL)'],
  [/ pct$/, ' (%)'],
];

/** "solutionTemperatureC" → "solution temperature (°C)"; "failedLoginCount" → "failed login count". */
function fieldWords(name: string): string {
  let n = ` ${name.replace(/_/g, ' ').replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase()}`;
  for (const [re, words] of UNIT_SUFFIX) {
    if (re.test(n)) {
      n = n.replace(re, words);
      break;
    }
  }
  return n.trim();
}

/** A recorded field name in words: "preparation.dilutionResult" → "Preparation: dilution result". */
export function fieldLabel(field: string): string {
  const words = field.split('.').map(fieldWords);
  const text = words.join(': ');
  return text.charAt(0).toUpperCase() + text.slice(1);
}
