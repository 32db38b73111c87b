/**
 * Inventory DTOs as the read-only list endpoints return them. Every measured value is a decimal string
 * exactly as stored; dates are "YYYY-MM-DD"; times are UTC ISO strings.
 */
import { z } from 'zod';

export const MATERIAL_GRADES = ['CRM', 'RM', 'reagent'] as const;
export const PURITY_BASES = ['as-is', 'dried'] as const;
export const LOT_STATUSES = ['accepted', 'quarantined', 'retired'] as const;
export const BALANCE_STATUSES = ['in_service', 'out_of_service'] as const;
export const WARE_KINDS = ['volumetric_flask', 'bulb_pipette', 'graduated_pipette', 'piston_pipette'] as const;
export const WARE_CLASSES = ['A', 'B', 'n/a'] as const;
export const WARE_STATUSES = ['in_service', 'out_of_service', 'retired'] as const;

const dec = z.string();
const optDec = z.string().nullable();
const date = z.string().nullable();

export const analyteSchema = z.object({ name: z.string(), formula: z.string() });

export const referenceMaterialSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  formula: z.string(),
  analytes: z.array(analyteSchema),
  casNumber: z.string().nullable(),
  grade: z.enum(MATERIAL_GRADES),
  producer: z.string(),
  catalogueNumber: z.string().nullable(),
  lot: z.string(),
  certificateNumber: z.string().nullable(),
  purity: z.object({
    value: dec,
    expandedUncertainty: optDec,
    k: optDec,
    standardUncertainty: optDec,
    basis: z.enum(PURITY_BASES),
  }),
  densityGPerMl: optDec,
  receivedOn: date,
  openedOn: date,
  expiresOn: date,
  storage: z.string().nullable(),
  ghsHazardStatements: z.array(z.string()),
  ghsPictograms: z.array(z.string()),
  status: z.enum(LOT_STATUSES),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type ReferenceMaterial = z.infer<typeof referenceMaterialSchema>;

export const balanceSchema = z.object({
  id: z.number().int(),
  identifier: z.string(),
  description: z.string(),
  location: z.string().nullable(),
  capacityG: dec,
  readabilityMg: dec,
  minWeightMg: optDec,
  minWeightDeterminedOn: date,
  repeatabilitySdMg: optDec,
  minWeightSafetyFactor: optDec,
  calibratedOn: date,
  calibrationDueOn: date,
  calibrationUncertaintyMg: optDec,
  calibrationUncertaintyK: optDec,
  weightDensityGPerMl: dec,
  status: z.enum(BALANCE_STATUSES),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Balance = z.infer<typeof balanceSchema>;

export const volumetricWareSchema = z.object({
  id: z.number().int(),
  identifier: z.string(),
  kind: z.enum(WARE_KINDS),
  nominalVolumeMl: dec,
  class: z.enum(WARE_CLASSES),
  toleranceMl: optDec,
  material: z.string().nullable(),
  status: z.enum(WARE_STATUSES),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type VolumetricWare = z.infer<typeof volumetricWareSchema>;

export const solventSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  grade: z.string().nullable(),
  lot: z.string(),
  density20cGPerMl: optDec,
  expansionCoefficientPerK: optDec,
  expiresOn: date,
  status: z.enum(LOT_STATUSES),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Solvent = z.infer<typeof solventSchema>;

export const listResponseSchema = <T extends z.ZodType>(item: T) => z.object({ items: z.array(item) });
