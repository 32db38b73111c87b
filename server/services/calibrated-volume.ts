/**
 * The calibrated volume a preparation may use instead of the nominal volume and the class tolerance (issue 12):
 * when the lab setting `useCalibratedVolumes` is on, a flask or pipette whose latest verified volume check passed,
 * is in date (next due on or after the lab's day) and tested the volume used gives the budget
 *   V = the check's mean volume at 20 °C, u(V) = U/k of that mean (JCGM 100 §4.3.3: a stated expanded
 *   uncertainty divided by its coverage factor), and the check's s as the repeatability of one delivery or fill.
 * The result is frozen into the record's snapshot of the ware (WareDto.calibratedVolume) at plan, aliquot or make-up,
 * so a newer check never changes a record already written. A failed latest check gives nothing here (the planning
 * gate refuses the ware, volume-check-gate.ts); an expired one, or one that did not test this volume, falls back to
 * the class tolerance. "Covering" is taken strictly: the tested volume equals the volume used; no interpolation
 * between a piston pipette's tested settings.
 */
import type { Transaction } from 'sequelize';
import { D } from '../../shared/calc/decimal.ts';
import { convertVolume } from '../../shared/calc/units.ts';
import type { CalibratedVolume, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type { LabSettings } from '../../shared/schemas/settings.ts';
import { VolumeCheck } from '../db/models/index.ts';

interface StoredTested {
  testedVolume: { value: string; unit: string };
  mean: { value: string; unit: string };
  randomError: { standardDeviation: { value: string; unit: string } };
  uncertainty: { expandedUncertainty: string; k: string; unit: string };
}

/** The latest verified check of a ware item as a calibrated volume at volumeMl, or null (with no check, a failed, expired or other-volume one). */
export async function calibratedVolumeOf(wareId: number, volumeMl: string, today: string, transaction?: Transaction): Promise<CalibratedVolume | null> {
  const latest = await VolumeCheck.findOne({ where: { wareId, status: 'verified' }, order: [['id', 'DESC']], transaction });
  const result = latest?.result as { verdict?: string; tested?: StoredTested[] } | null | undefined;
  if (!latest || !result || result.verdict !== 'pass' || !result.tested) return null;
  if (!latest.nextDueOn || latest.nextDueOn < today) return null;
  const used = new D(volumeMl);
  const t = result.tested.find((x) => convertVolume(x.testedVolume.value, x.testedVolume.unit, 'mL').eq(used));
  if (!t) return null;
  const toMl = (v: string) => convertVolume(v, t.uncertainty.unit || t.mean.unit, 'mL').toSignificantDigits(20).toFixed();
  const U = toMl(t.uncertainty.expandedUncertainty);
  return {
    checkId: latest.id,
    checkIdentifier: latest.identifier,
    volumeMl: convertVolume(t.testedVolume.value, t.testedVolume.unit, 'mL').toFixed(),
    meanMl: convertVolume(t.mean.value, t.mean.unit, 'mL').toSignificantDigits(20).toFixed(),
    expandedUncertaintyMl: U,
    k: t.uncertainty.k,
    standardUncertaintyMl: new D(U).div(t.uncertainty.k).toSignificantDigits(20).toFixed(),
    repeatabilitySdMl: convertVolume(t.randomError.standardDeviation.value, t.randomError.standardDeviation.unit, 'mL').toSignificantDigits(20).toFixed(),
    verifiedOn: latest.updatedAt.slice(0, 10),
    nextDueOn: latest.nextDueOn,
  };
}

/**
 * The ware snapshot a record stores: unchanged when the setting is off or no usable check covers the volume
 * (so snapshots, budgets and hashes are exactly as before), else with `calibratedVolume` added.
 */
export async function withCalibratedVolume(ware: WareDto, volumeMl: string, settings: Pick<LabSettings, 'useCalibratedVolumes'>, today: string, transaction?: Transaction): Promise<WareDto> {
  if (!settings.useCalibratedVolumes) return ware;
  const cv = await calibratedVolumeOf(ware.id, volumeMl, today, transaction);
  return cv ? { ...ware, calibratedVolume: cv } : ware;
}
