/**
 * What a scanned (or typed) code opens. Scanners type the code and press Enter.
 *  - a preparation identifier ("HWL-2026-0042"), also inside a record link such as
 *    "https://lab.example/preparations/HWL-2026-0042" (the QR code on the prep sheet) → the record;
 *  - a calibration series identifier ("HWL-2026-S001", the QR code on the series sheet), also inside a
 *    "/series/HWL-2026-S001" link → the series page;
 *  - otherwise an inventory code: a balance or volumetric-ware identifier ("BAL-A1", "VF-100-01"),
 *    or the lot of a reference material or solvent → that inventory page;
 *  - anything else → "not found".
 */
import { api } from '../../lib/api-client.ts';
import { PREPARATION_ID_RE, SERIES_ID_RE } from '../../../shared/prep/identifiers.ts';

export type ScanTarget = { kind: 'found'; to: string; label: string } | { kind: 'not-found'; code: string };

/** Trims the code, drops control characters some scanners add (GS, CR), and upper-cases identifiers. */
export function cleanScan(raw: string): string {
  // eslint-disable-next-line no-control-regex
  return raw.replace(/[\u0000-\u001f\u007f]/g, '').trim();
}

/** The preparation identifier in a scan, or null. */
export function preparationIdentifierIn(raw: string): string | null {
  const text = cleanScan(raw);
  const direct = text.toUpperCase();
  if (PREPARATION_ID_RE.test(direct)) return direct;
  const m = /\/preparations\/([A-Za-z]{2,6}-\d{4}-\d{4,})(?:[/?#]|$)/.exec(text);
  if (m && PREPARATION_ID_RE.test(m[1]!.toUpperCase())) return m[1]!.toUpperCase();
  return null;
}

/** The calibration series identifier in a scan, or null. */
export function seriesIdentifierIn(raw: string): string | null {
  const text = cleanScan(raw);
  const direct = text.toUpperCase();
  if (SERIES_ID_RE.test(direct)) return direct;
  const m = /\/series\/([A-Za-z][A-Za-z0-9]{1,7}-\d{4}-[Ss]\d{3,})(?:[/?#]|$)/.exec(text);
  return m ? m[1]!.toUpperCase() : null;
}

type Row = { id: number; identifier?: string; lot?: string; name?: string };

/** The inventory registers a scan may name, and the field that holds the scanned code. */
const REGISTERS = [
  { api: '/api/balances', page: '/inventory/balances', field: 'identifier', what: 'Balance' },
  { api: '/api/volumetric-ware', page: '/inventory/volumetric-ware', field: 'identifier', what: 'Volumetric ware' },
  { api: '/api/materials', page: '/inventory/materials', field: 'lot', what: 'Reference material lot' },
  { api: '/api/solvents', page: '/inventory/solvents', field: 'lot', what: 'Solvent lot' },
] as const;

async function findIn(register: (typeof REGISTERS)[number], code: string): Promise<Row | null> {
  try {
    const body = await api.get<{ items?: Row[] } | Row[]>(`${register.api}?search=${encodeURIComponent(code)}&pageSize=20`);
    const rows = Array.isArray(body) ? body : (body.items ?? []);
    const want = code.toUpperCase();
    return rows.find((r) => (r[register.field] ?? '').toString().trim().toUpperCase() === want) ?? null;
  } catch {
    return null; // a register the role may not read, or one not there: not a match
  }
}

export async function resolveScan(raw: string): Promise<ScanTarget> {
  const code = cleanScan(raw);
  const prep = preparationIdentifierIn(code);
  if (prep) return { kind: 'found', to: `/preparations/${encodeURIComponent(prep)}`, label: `Preparation ${prep}` };
  const series = seriesIdentifierIn(code);
  if (series) return { kind: 'found', to: `/series/${encodeURIComponent(series)}`, label: `Calibration series ${series}` };
  if (code === '') return { kind: 'not-found', code };
  const hits = await Promise.all(REGISTERS.map((r) => findIn(r, code)));
  for (let i = 0; i < REGISTERS.length; i++) {
    const row = hits[i];
    if (row) {
      const r = REGISTERS[i]!;
      return { kind: 'found', to: `${r.page}/${row.id}`, label: `${r.what} ${row.identifier ?? row.lot ?? code}` };
    }
  }
  return { kind: 'not-found', code };
}
