/**
 * The server's side of readings straight from the balance (issue 15): every reading of a weighing or a
 * gravimetric readings record is stored with how it came in. A capture from the balance is parsed again here with
 * the shared parser (shared/balance/capture.ts checkCapture); a value, unit, stability or balance identity that
 * does not hold is refused with 422 at the reading's field and nothing is stored.
 */
import { captureOf, checkCapture, type CaptureInput, type StoredCapture } from '../../shared/balance/capture.ts';
import type { Balance as BalanceDto } from '../../shared/schemas/inventory.ts';
import type { LabSettings } from '../../shared/schemas/settings.ts';
import { AppError } from '../errors/app-error.ts';

export function checkedCaptures<F extends string>(
  readings: ReadonlyArray<readonly [F, string | undefined]>,
  captures: Partial<Record<F, CaptureInput>> | undefined,
  unit: 'g' | 'mg',
  balance: BalanceDto,
  settings: Pick<LabSettings, 'allowUnstableReadings'>,
  now: string,
): Partial<Record<F, StoredCapture>> {
  const out: Partial<Record<F, StoredCapture>> = {};
  const fields: Record<string, string> = {};
  for (const [field, value] of readings) {
    if (value === undefined) {
      if (captures?.[field]) fields[field] = 'A capture was sent for a reading this entry does not have';
      continue;
    }
    const check = checkCapture(captures?.[field], { value, unit, balance, allowUnstable: settings.allowUnstableReadings === true, now });
    if (check.ok) out[field] = check.stored;
    else fields[field] = check.message;
  }
  if (Object.keys(fields).length) throw new AppError('capture_refused', 422, Object.values(fields)[0]!, { fields });
  return out;
}

/** One line per reading for the audit trail: "reading: serial, stable, print id BAL-01" / "before: typed". */
export function captureSummary(captures: Partial<Record<string, StoredCapture>>): string {
  return Object.entries(captures)
    .map(([field, c]) => `${field}: ${c!.method}${c!.stability ? `, ${c!.stability}` : ''}${c!.balancePrintId ? `, print id ${c!.balancePrintId}` : ''}${c!.flags.includes('unstable_allowed') ? ', unstable allowed by lab setting' : ''}`)
    .join('; ');
}

/** The stored captures of a row's readings, each field present (rows from before capture was recorded: legacy typed). */
export function capturesOf<F extends string>(stored: Record<string, StoredCapture> | null | undefined, fields: readonly F[]): Record<F, StoredCapture> {
  return Object.fromEntries(fields.map((f) => [f, captureOf(stored, f)])) as Record<F, StoredCapture>;
}
