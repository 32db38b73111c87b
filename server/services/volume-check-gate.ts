/**
 * The planning gate's view of volume checks: the latest verified check of a ware item when it failed.
 * Kept apart from volume-check.service.ts so preparations and lineage can import it without a cycle.
 */
import type { Transaction } from 'sequelize';
import { VolumeCheck } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';

export async function failedCheckOf(wareId: number, transaction?: Transaction): Promise<{ identifier: string } | null> {
  const latest = await VolumeCheck.findOne({ where: { wareId, status: 'verified' }, order: [['id', 'DESC']], transaction });
  const verdict = (latest?.result as { verdict?: string } | null)?.verdict;
  return latest && verdict === 'fail' ? { identifier: latest.identifier } : null;
}

/** 400 naming the field and the failed check, for ware chosen in a dilution or make-up. */
export async function refuseFailedWare(ware: { id: number; identifier: string }, field: string): Promise<void> {
  const failed = await failedCheckOf(ware.id);
  if (failed) {
    const msg = `${ware.identifier} failed its volume check ${failed.identifier}; do not use it until a new check passes`;
    throw AppError.validation(msg, { [field]: msg });
  }
}
