/**
 * The trace of a standard reaches the ware's volume check and the check's balance: for a ware item used at a
 * time, the latest verified check before that time, as a node "volume_check:<id>" linked to the ware
 * ("checked in") and to the balance the check weighed on ("check weighed on"). Graph only. When the record used the
 * ware's calibrated volume, the check frozen in its snapshot is traced instead, with an edge to the standard itself.
 */
import { Op } from 'sequelize';
import type { TraceEdge, TraceNode } from '../../shared/schemas/trace.ts';
import { VolumeCheck } from '../db/models/index.ts';
import type { CalibratedVolume } from '../../shared/schemas/inventory.ts';
import { calibratedVolumeShown, twoDigits } from '../../shared/prep/calibrated-volume.ts';

export async function traceVolumeCheck(
  g: { node(n: TraceNode): string; edge(e: TraceEdge): void },
  wareNodeId: string,
  wareId: number,
  usedAt: string,
  /** the calibrated volume frozen in the record's snapshot: that check (not the latest) is traced, as an input of the standard */
  used?: { calibratedVolume: CalibratedVolume; preparationNodeId: string; what: string },
): Promise<void> {
  const c = used
    ? await VolumeCheck.findByPk(used.calibratedVolume.checkId)
    : await VolumeCheck.findOne({ where: { wareId, status: 'verified', updatedAt: { [Op.lte]: usedAt } }, order: [['id', 'DESC']] });
  if (!c) return;
  const verdict = (c.result as { verdict?: string } | null)?.verdict ?? 'no result';
  const b = c.balanceSnapshot as { identifier?: string; calibrationDueOn?: string; readabilityMg?: string };
  const cid = g.node({
    id: `volume_check:${c.id}`,
    type: 'volume_check',
    label: `${c.identifier} volume check (${verdict})`,
    status: verdict === 'pass' ? `passed; next due ${c.nextDueOn ?? '—'}` : 'failed',
    detail: { identifier: c.identifier, verdict, nextDueOn: c.nextDueOn, calcVersion: c.calcVersion },
  });
  g.edge({ from: cid, to: wareNodeId, relation: 'checked in', at: c.updatedAt });
  if (used) {
    const cv = used.calibratedVolume;
    g.edge({ from: cid, to: used.preparationNodeId, relation: `calibrated volume of the ${used.what} (${calibratedVolumeShown(cv)} mL, u = ${twoDigits(cv.standardUncertaintyMl)} mL)`, at: usedAt });
  }
  const bid = g.node({
    id: `balance:${c.balanceId}`,
    type: 'balance',
    label: `${b.identifier ?? `balance ${c.balanceId}`}`,
    status: `calibration due ${b.calibrationDueOn ?? '—'}`,
    detail: { identifier: b.identifier, calibrationDueOn: b.calibrationDueOn, readabilityMg: b.readabilityMg },
  });
  g.edge({ from: bid, to: cid, relation: 'check weighed on', at: c.createdAt });
}
