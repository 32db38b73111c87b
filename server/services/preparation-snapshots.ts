/**
 * Frozen copies of inventory rows, taken when a preparation is planned, weighed or made up
 * (REQUIREMENTS 0.1 principle 6: equipment status is snapshotted at the moment of use). The shapes are the
 * inventory DTOs of shared/schemas/inventory.ts; decimal values stay the strings stored.
 */
import type { Balance as BalanceDto, ReferenceMaterial as MaterialDto, Solvent as SolventDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import { User, type Balance, type ReferenceMaterial, type Solvent, type VolumetricWare } from '../db/models/index.ts';

/** A column the inventory may or may not have yet (read by name so the snapshot keeps whatever is stored). */
function opt<T = string | null>(row: { get(key: string): unknown }, key: string): T {
  const v = row.get(key);
  return (v === undefined ? null : v) as T;
}

const retired = (row: { get(key: string): unknown }) => ({ retiredAt: opt(row, 'retiredAt'), retiredReason: opt(row, 'retiredReason') });

export async function materialSnapshot(m: ReferenceMaterial): Promise<MaterialDto> {
  const acceptedById = opt<number | null>(m, 'acceptedById');
  const acceptedByUser = acceptedById ? await User.findByPk(acceptedById) : null;
  return {
    id: m.id,
    name: m.name,
    formula: m.formula,
    analytes: m.analytes,
    casNumber: m.casNumber,
    grade: m.grade,
    producer: m.producer,
    catalogueNumber: m.catalogueNumber,
    lot: m.lot,
    certificateNumber: m.certificateNumber,
    purity: {
      value: m.purityValue,
      expandedUncertainty: m.purityExpandedUncertainty,
      k: m.purityK,
      standardUncertainty: m.purityStandardUncertainty,
      basis: m.purityBasis,
    },
    densityGPerMl: m.densityValue,
    receivedOn: m.receivedOn,
    openedOn: m.openedOn,
    expiresOn: m.expiresOn,
    storage: m.storage,
    ghsHazardStatements: m.ghsHazardStatements,
    ghsPictograms: m.ghsPictograms,
    status: m.status,
    acceptedBy: acceptedById ? { id: acceptedById, fullName: acceptedByUser?.fullName ?? `user ${acceptedById}` } : null,
    acceptedAt: opt(m, 'acceptedAt'),
    ...retired(m),
    createdAt: m.createdAt,
    updatedAt: m.updatedAt,
  };
}

export function balanceSnapshot(b: Balance): BalanceDto {
  return {
    id: b.id,
    identifier: b.identifier,
    description: b.description,
    location: b.location,
    capacityG: b.capacityG,
    readabilityMg: b.readabilityMg,
    minWeightMg: b.minWeightMg,
    minWeightDeterminedOn: b.minWeightDeterminedOn,
    repeatabilitySdMg: b.repeatabilitySdMg,
    minWeightSafetyFactor: b.minWeightSafetyFactor,
    calibratedOn: b.calibratedOn,
    calibrationDueOn: b.calibrationDueOn,
    calibrationUncertaintyMg: b.calibrationUncertaintyMg,
    calibrationUncertaintyK: b.calibrationUncertaintyK,
    weightDensityGPerMl: b.weightDensity,
    minWeightReadabilityMg: opt(b, 'minWeightReadabilityMg'),
    minWeightComputed: Boolean(opt<boolean | null>(b, 'minWeightComputed')),
    status: b.status,
    ...retired(b),
    createdAt: b.createdAt,
    updatedAt: b.updatedAt,
  };
}

export function wareSnapshot(w: VolumetricWare): WareDto {
  return {
    id: w.id,
    identifier: w.identifier,
    kind: w.kind,
    nominalVolumeMl: w.nominalVolumeMl,
    class: w.wareClass,
    toleranceMl: w.toleranceMl,
    material: w.material,
    status: w.status,
    ...retired(w),
    createdAt: w.createdAt,
    updatedAt: w.updatedAt,
  };
}

export function solventSnapshot(s: Solvent): SolventDto {
  return {
    id: s.id,
    name: s.name,
    grade: s.grade,
    lot: s.lot,
    density20cGPerMl: s.density20c,
    expansionCoefficientPerK: s.expansionCoefficient,
    expiresOn: s.expiresOn,
    status: s.status,
    ...retired(s),
    createdAt: s.createdAt,
    updatedAt: s.updatedAt,
  };
}
