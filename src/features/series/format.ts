/** Display helpers for calibration series. Values stay the API's decimal strings and display texts. */
import { SERIES_ID_RE } from '../../../shared/prep/identifiers.ts';
import type { SeriesLevelDetail } from '../../../shared/schemas/lineage.ts';

export function isSeriesIdentifier(text: string): boolean {
  return SERIES_ID_RE.test(text.trim().toUpperCase());
}

/** "1 of 5 verified", "all 5 verified", "none verified yet (5 levels)". */
export function verifiedProgress(levels: ReadonlyArray<{ status: string }>): string {
  const n = levels.length;
  const v = levels.filter((l) => l.status === 'verified').length;
  if (n === 0) return 'no levels';
  if (v === n) return n === 1 ? 'the level is verified' : `all ${n} verified`;
  if (v === 0) return `none verified yet (${n} level${n === 1 ? '' : 's'})`;
  return `${v} of ${n} verified`;
}

/** How many levels are in each status, in the order of the journey, in words: "1 verified, 4 planned". */
export function statusCounts(levels: ReadonlyArray<{ status: string }>): string {
  const order = ['planned', 'prepared', 'returned', 'verified', 'expired', 'discarded'];
  const counts = new Map<string, number>();
  for (const l of levels) counts.set(l.status, (counts.get(l.status) ?? 0) + 1);
  const keys = [...counts.keys()].sort((a, b) => (order.indexOf(a) + 1 || 99) - (order.indexOf(b) + 1 || 99));
  return keys.map((k) => `${counts.get(k)} ${k.replace(/_/g, ' ')}`).join(', ');
}

/** Lowest to highest target, e.g. "1–20 mg/L"; one value alone when all are the same. */
export function targetRange(levels: ReadonlyArray<{ target: { value: string; unit: string } }>): string {
  if (!levels.length) return '—';
  const sorted = [...levels].sort((a, b) => compareDecimal(a.target.value, b.target.value));
  const lo = sorted[0]!.target;
  const hi = sorted.at(-1)!.target;
  return compareDecimal(lo.value, hi.value) === 0 ? `${lo.value} ${lo.unit}` : `${lo.value}–${hi.value} ${hi.unit}`;
}

/** Compares two non-negative decimal strings exactly (no floats): -1, 0 or 1. */
export function compareDecimal(a: string, b: string): number {
  const norm = (s: string) => {
    const [i = '0', f = ''] = s.trim().split('.');
    return { i: i.replace(/^0+(?=\d)/, ''), f: f.replace(/0+$/, '') };
  };
  const x = norm(a);
  const y = norm(b);
  if (x.i.length !== y.i.length) return x.i.length < y.i.length ? -1 : 1;
  if (x.i !== y.i) return x.i < y.i ? -1 : 1;
  const len = Math.max(x.f.length, y.f.length);
  const fx = x.f.padEnd(len, '0');
  const fy = y.f.padEnd(len, '0');
  return fx === fy ? 0 : fx < fy ? -1 : 1;
}

/** The concentration to show for a level: the recomputed result once recorded, else the plan, labelled. */
export function levelConcentration(l: Pick<SeriesLevelDetail, 'planned' | 'result'>): { text: string; basis: 'recomputed' | 'planned' } {
  return l.result ? { text: l.result.display, basis: 'recomputed' } : { text: l.planned.display, basis: 'planned' };
}

/** "0.99901 mL with PP-1000-01". */
export function aliquotText(l: Pick<SeriesLevelDetail, 'aliquot'>): string {
  return `${l.aliquot.volumeMl} mL with ${l.aliquot.pipette.identifier}`;
}

/** The bench is open to chemists and technicians while the level is planned (aliquot, make-up). */
export function benchOpen(status: string, role: string | undefined): boolean {
  return status === 'planned' && (role === 'chemist' || role === 'technician');
}
