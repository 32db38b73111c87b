/** Valid inventory inputs and small certificate files for the inventory and certificate tests. */

export const validMaterial = (over: Record<string, unknown> = {}) => ({
  name: 'Potassium chloride',
  formula: 'KCl',
  analytes: [{ name: 'potassium', formula: 'K' }],
  casNumber: '7447-40-7', // KCl; check digit verified by hand with the CAS weighted-sum rule
  grade: 'CRM',
  producer: 'Northgate Reference Materials',
  catalogueNumber: 'NRM-KCL-100',
  lot: 'KCL-26-0001',
  certificateNumber: 'C-26-0001',
  purity: { value: '0.99985', expandedUncertainty: '0.00010', k: '2', basis: 'dried' },
  densityGPerMl: '1.98',
  receivedOn: '2026-01-10',
  openedOn: null,
  expiresOn: '2999-12-31',
  storage: 'desiccator D2',
  ghsHazardStatements: [],
  ghsPictograms: [],
  status: 'quarantined',
  ...over,
});

export const validBalance = (over: Record<string, unknown> = {}) => ({
  identifier: 'BAL-X1',
  description: 'Analytical balance, 220 g',
  location: 'Room 2.14',
  capacityG: '220',
  readabilityMg: '0.1',
  minWeightMg: '82',
  minWeightDeterminedOn: '2026-01-05',
  repeatabilitySdMg: '0.041',
  minWeightSafetyFactor: '1',
  calibratedOn: '2026-01-04',
  calibrationDueOn: '2999-01-04',
  calibrationUncertaintyMg: '0.15',
  calibrationUncertaintyK: '2',
  weightDensityGPerMl: '8.0',
  status: 'in_service',
  ...over,
});

export const validWare = (over: Record<string, unknown> = {}) => ({
  identifier: 'VF-X-100',
  kind: 'volumetric_flask',
  nominalVolumeMl: '100',
  class: 'A',
  toleranceMl: '0.10',
  material: 'borosilicate 3.3',
  status: 'in_service',
  ...over,
});

export const validSolvent = (over: Record<string, unknown> = {}) => ({
  name: 'Acetonitrile',
  grade: 'HPLC grade',
  lot: 'ACN-26-0001',
  density20cGPerMl: '0.7822',
  expansionCoefficientPerK: '0.00137',
  expiresOn: '2999-06-30',
  status: 'accepted',
  ...over,
});

/** A tiny but well-formed PDF (header "%PDF-1.4", ISO 32000-1 §7.5.2). */
export const PDF_BYTES = Buffer.from(
  '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n',
  'latin1',
);
/** A 1×1 PNG (signature 89 50 4E 47 0D 0A 1A 0A, PNG spec §5.2). */
export const PNG_BYTES = Buffer.from(
  'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==',
  'base64',
);
/** JPEG start of image FF D8 FF then a JFIF APP0 marker. */
export const JPEG_BYTES = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10]), Buffer.from('JFIF\0\x01\x01\0\0\x01\0\x01\0\0', 'latin1'), Buffer.from([0xff, 0xd9])]);
