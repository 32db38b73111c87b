/** Read-only inventory lists (full CRUD comes later). Decimal values stay strings. */
import type { Balance as BalanceDto, ReferenceMaterial as MaterialDto, Solvent as SolventDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import { Balance, ReferenceMaterial, Solvent, VolumetricWare } from '../db/models/index.ts';

export async function listMaterials(): Promise<MaterialDto[]> {
  const rows = await ReferenceMaterial.findAll({ order: [['name', 'ASC'], ['lot', 'ASC']] });
  return rows.map((m) => ({
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
    createdAt: m.createdAt,
    updatedAt: m.updatedAt,
  }));
}

export async function listBalances(): Promise<BalanceDto[]> {
  const rows = await Balance.findAll({ order: [['identifier', 'ASC']] });
  return rows.map((b) => ({
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
    status: b.status,
    createdAt: b.createdAt,
    updatedAt: b.updatedAt,
  }));
}

export async function listVolumetricWare(): Promise<WareDto[]> {
  const rows = await VolumetricWare.findAll({ order: [['kind', 'ASC'], ['identifier', 'ASC']] });
  return rows.map((w) => ({
    id: w.id,
    identifier: w.identifier,
    kind: w.kind,
    nominalVolumeMl: w.nominalVolumeMl,
    class: w.wareClass,
    toleranceMl: w.toleranceMl,
    material: w.material,
    status: w.status,
    createdAt: w.createdAt,
    updatedAt: w.updatedAt,
  }));
}

export async function listSolvents(): Promise<SolventDto[]> {
  const rows = await Solvent.findAll({ order: [['name', 'ASC'], ['lot', 'ASC']] });
  return rows.map((s) => ({
    id: s.id,
    name: s.name,
    grade: s.grade,
    lot: s.lot,
    density20cGPerMl: s.density20c,
    expansionCoefficientPerK: s.expansionCoefficient,
    expiresOn: s.expiresOn,
    status: s.status,
    createdAt: s.createdAt,
    updatedAt: s.updatedAt,
  }));
}
