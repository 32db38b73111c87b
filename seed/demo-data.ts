/**
 * Demo data for "Harbourside Water Laboratory", a FICTIONAL drinking- and waste-water lab.
 * People, producers, catalogue numbers, lots and certificate numbers are invented.
 *
 * Where numbers come from (all from memory unless stated; check before relying on them):
 * - Densities of the solids: handbook values (CRC Handbook style tables), rounded as usually quoted.
 * - GHS hazard statements and pictograms: as commonly given on suppliers' safety data sheets.
 * - Purities and their uncertainties: invented but plausible for CRM / RM / reagent grades.
 * - Balance minimum weights: computed with the USP <41> rule m_min = 2000 · max(s, 0.41 · d)
 *   (REQUIREMENTS EQ-04); the numbers below are consistent with it (tests/server/seed.test.ts checks).
 * - Flask tolerances: ISO 1042 class A; bulb pipettes: ISO 648 class A; graduated pipette: ISO 835
 *   class A; piston pipettes: ISO 8655-2 maximum systematic error at nominal volume.
 * - Water density at 20 °C (0.99820 g/mL) and its expansion coefficient (2.07e-4 /K): handbook values.
 * - Methanol 0.7914 g/mL and 1.2e-3 /K: handbook values. 2 % (v/v) nitric acid 1.008 g/mL: an estimate.
 */
import type { Role } from '../shared/schemas/roles.ts';

/** Every demo account uses this password (README lists the accounts). */
export const DEMO_PASSWORD = 'bench-demo-2026';

export interface DemoUser {
  email: string;
  fullName: string;
  initials: string;
  role: Role;
  active: boolean;
}

export const demoUsers: DemoUser[] = [
  { email: 'chemist@harbourside.example', fullName: 'Dr. Maren Tollefsen', initials: 'MT', role: 'chemist', active: true },
  { email: 'chemist2@harbourside.example', fullName: 'Idris Okonkwo-Baptiste', initials: 'IOB', role: 'chemist', active: true },
  { email: 'technician@harbourside.example', fullName: 'Priya Lindqvist', initials: 'PL', role: 'technician', active: true },
  { email: 'qa@harbourside.example', fullName: 'Tomasz Achterberg', initials: 'TA', role: 'qa', active: true },
  { email: 'admin@harbourside.example', fullName: 'Lena Marchetti', initials: 'LM', role: 'admin', active: true },
  // A former analyst: deactivated, never deleted (REQUIREMENTS ES-05). Shows the inactive state.
  { email: 'former.chemist@harbourside.example', fullName: 'Jonas Vireo', initials: 'JV', role: 'chemist', active: false },
];

export interface DemoMaterial {
  name: string;
  formula: string;
  analytes: { name: string; formula: string }[];
  casNumber: string;
  grade: 'CRM' | 'RM' | 'reagent';
  producer: string;
  catalogueNumber: string;
  lot: string;
  certificateNumber: string | null;
  purityValue: string;
  purityExpandedUncertainty: string | null;
  purityK: string | null;
  purityStandardUncertainty: string | null;
  purityBasis: 'as-is' | 'dried';
  densityValue: string;
  receivedOn: string;
  openedOn: string | null;
  expiresOn: string;
  storage: string;
  ghsHazardStatements: string[];
  ghsPictograms: string[];
  status: 'accepted' | 'quarantined' | 'retired';
}

// Producers are fictional: "Northmoor Reference Materials" and "Fenwick Scientific".
export const demoMaterials: DemoMaterial[] = [
  {
    name: 'Lead(II) nitrate',
    formula: 'Pb(NO3)2',
    analytes: [{ name: 'lead', formula: 'Pb' }],
    casNumber: '10099-74-8',
    grade: 'CRM',
    producer: 'Northmoor Reference Materials',
    catalogueNumber: 'NRM-PB-0112',
    lot: 'NRM-24-0931',
    certificateNumber: 'NRM-C-24-0931 v1',
    purityValue: '0.9995',
    purityExpandedUncertainty: '0.0004',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'dried',
    densityValue: '4.53',
    receivedOn: '2026-02-10',
    openedOn: '2026-03-02',
    expiresOn: '2028-02-29',
    storage: 'Room temperature, dry; dry 2 h at 105 °C before use',
    ghsHazardStatements: ['H272', 'H302', 'H332', 'H360Df', 'H373', 'H410'],
    ghsPictograms: ['GHS03', 'GHS07', 'GHS08', 'GHS09'],
    status: 'accepted',
  },
  {
    name: 'Sodium chloride',
    formula: 'NaCl',
    analytes: [{ name: 'chloride', formula: 'Cl' }],
    casNumber: '7647-14-5',
    grade: 'CRM',
    producer: 'Northmoor Reference Materials',
    catalogueNumber: 'NRM-NACL-0205',
    lot: 'NRM-25-1140',
    certificateNumber: 'NRM-C-25-1140 v2',
    purityValue: '0.99970',
    purityExpandedUncertainty: '0.00020',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'dried',
    densityValue: '2.165',
    receivedOn: '2026-04-14',
    openedOn: '2026-05-06',
    expiresOn: '2027-10-31',
    storage: 'Room temperature, desiccator; dry 2 h at 110 °C before use',
    ghsHazardStatements: [],
    ghsPictograms: [],
    status: 'accepted',
  },
  {
    name: 'Potassium hydrogen phthalate',
    formula: 'C8H5KO4',
    analytes: [{ name: 'carbon (TOC)', formula: 'C' }],
    casNumber: '877-24-7',
    grade: 'CRM',
    producer: 'Fenwick Scientific',
    catalogueNumber: 'FS-KHP-100',
    lot: 'FS-KHP-25-077',
    certificateNumber: 'FS-CoA-25-077',
    purityValue: '0.99990',
    purityExpandedUncertainty: '0.00030',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'dried',
    densityValue: '1.636',
    receivedOn: '2026-01-20',
    openedOn: '2026-02-03',
    expiresOn: '2028-06-30',
    storage: 'Room temperature, desiccator; dry 2 h at 120 °C before use',
    ghsHazardStatements: [],
    ghsPictograms: [],
    status: 'accepted',
  },
  {
    name: 'Sodium nitrate',
    formula: 'NaNO3',
    analytes: [{ name: 'nitrate', formula: 'NO3' }],
    casNumber: '7631-99-4',
    grade: 'RM',
    producer: 'Fenwick Scientific',
    catalogueNumber: 'FS-NANO3-500',
    lot: 'FS-25-N0412',
    certificateNumber: 'FS-CoA-25-N0412',
    purityValue: '0.9990',
    purityExpandedUncertainty: '0.0010',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'dried',
    densityValue: '2.26',
    receivedOn: '2025-11-03',
    openedOn: '2025-11-17',
    expiresOn: '2027-04-30',
    storage: 'Room temperature, dry; keep away from combustibles',
    ghsHazardStatements: ['H272', 'H302', 'H319'],
    ghsPictograms: ['GHS03', 'GHS07'],
    status: 'accepted',
  },
  {
    name: 'Potassium dihydrogen phosphate',
    formula: 'KH2PO4',
    analytes: [{ name: 'phosphate', formula: 'PO4' }],
    casNumber: '7778-77-0',
    grade: 'CRM',
    producer: 'Northmoor Reference Materials',
    catalogueNumber: 'NRM-KDP-0330',
    lot: 'NRM-25-0588',
    certificateNumber: 'NRM-C-25-0588 v1',
    purityValue: '0.99950',
    purityExpandedUncertainty: '0.00040',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'dried',
    densityValue: '2.34',
    receivedOn: '2026-03-09',
    openedOn: '2026-03-30',
    expiresOn: '2027-12-31',
    storage: 'Room temperature, desiccator; dry 2 h at 105 °C before use',
    ghsHazardStatements: [],
    ghsPictograms: [],
    status: 'accepted',
  },
  {
    name: 'Copper(II) sulfate pentahydrate',
    formula: 'CuSO4(H2O)5', // mf-parser needs the hydrate in brackets (STACK P13)
    analytes: [{ name: 'copper', formula: 'Cu' }],
    casNumber: '7758-99-8',
    grade: 'RM',
    producer: 'Fenwick Scientific',
    catalogueNumber: 'FS-CUSO4-250',
    lot: 'FS-24-C1903',
    certificateNumber: 'FS-CoA-24-C1903',
    purityValue: '0.9990',
    purityExpandedUncertainty: '0.0008',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'as-is', // a hydrate: never dried
    densityValue: '2.286',
    receivedOn: '2025-09-22',
    openedOn: '2025-10-06',
    expiresOn: '2027-03-31',
    storage: 'Room temperature, tightly closed (do not dry)',
    ghsHazardStatements: ['H302', 'H315', 'H319', 'H410'],
    ghsPictograms: ['GHS07', 'GHS09'],
    status: 'accepted',
  },
  {
    name: 'Cadmium metal (granules)',
    formula: 'Cd',
    analytes: [{ name: 'cadmium', formula: 'Cd' }],
    casNumber: '7440-43-9',
    grade: 'CRM',
    producer: 'Northmoor Reference Materials',
    catalogueNumber: 'NRM-CD-0048',
    lot: 'NRM-23-0072',
    certificateNumber: 'NRM-C-23-0072 v3',
    purityValue: '0.99990',
    purityExpandedUncertainty: '0.00006',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'as-is',
    densityValue: '8.65',
    receivedOn: '2025-06-11',
    openedOn: '2025-07-01',
    expiresOn: '2028-09-30',
    storage: 'Room temperature, toxics cabinet T2',
    ghsHazardStatements: ['H330', 'H341', 'H350', 'H361fd', 'H372', 'H410'],
    ghsPictograms: ['GHS06', 'GHS08', 'GHS09'],
    status: 'accepted',
  },
  {
    // Deliberately expired, so the expiry gate has something to refuse.
    name: 'Sodium fluoride',
    formula: 'NaF',
    analytes: [{ name: 'fluoride', formula: 'F' }],
    casNumber: '7681-49-4',
    grade: 'RM',
    producer: 'Fenwick Scientific',
    catalogueNumber: 'FS-NAF-100',
    lot: 'FS-22-F0219',
    certificateNumber: 'FS-CoA-22-F0219',
    purityValue: '0.9985',
    purityExpandedUncertainty: '0.0010',
    purityK: '2',
    purityStandardUncertainty: null, // the certificate states U with k; u = U/k
    purityBasis: 'dried',
    densityValue: '2.558',
    receivedOn: '2023-05-15',
    openedOn: '2023-06-01',
    expiresOn: '2026-06-30',
    storage: 'Room temperature, dry; toxics cabinet T1',
    ghsHazardStatements: ['H301', 'H315', 'H319'],
    ghsPictograms: ['GHS06'],
    status: 'accepted',
  },
  {
    // Received, not yet accepted (REQUIREMENTS TR-03): cannot be used until QA accepts it.
    name: 'Potassium nitrate',
    formula: 'KNO3',
    analytes: [{ name: 'nitrate', formula: 'NO3' }],
    casNumber: '7757-79-1',
    grade: 'reagent',
    producer: 'Fenwick Scientific',
    catalogueNumber: 'FS-KNO3-1K',
    lot: 'FS-26-K0811',
    certificateNumber: null,
    purityValue: '0.995',
    purityExpandedUncertainty: null,
    purityK: null,
    purityStandardUncertainty: null,
    purityBasis: 'as-is',
    densityValue: '2.109',
    receivedOn: '2026-11-24',
    openedOn: null,
    expiresOn: '2028-11-30',
    storage: 'Room temperature, dry; keep away from combustibles',
    ghsHazardStatements: ['H272'],
    ghsPictograms: ['GHS03'],
    status: 'quarantined',
  },
];

export interface DemoBalance {
  identifier: string;
  description: string;
  location: string;
  capacityG: string;
  readabilityMg: string;
  repeatabilitySdMg: string;
  minWeightMg: string;
  minWeightDeterminedOn: string;
  minWeightSafetyFactor: string;
  calibratedOn: string;
  calibrationDueOn: string;
  calibrationUncertaintyMg: string;
  calibrationUncertaintyK: string;
  weightDensity: string;
  status: 'in_service' | 'out_of_service';
}

export const demoBalances: DemoBalance[] = [
  {
    identifier: 'BAL-A1',
    description: 'Analytical balance, 220 g × 0.1 mg',
    location: 'Weighing room 2.14, bench 1',
    capacityG: '220',
    readabilityMg: '0.1',
    repeatabilitySdMg: '0.08',
    minWeightMg: '160', // 2000 · max(0.08, 0.041) mg
    minWeightDeterminedOn: '2026-06-15',
    minWeightSafetyFactor: '1', // lab rule: the USP <41> minimum weight itself; with SF 2 (USP <1251>) it doubles
    calibratedOn: '2026-06-15',
    calibrationDueOn: '2027-06-15',
    calibrationUncertaintyMg: '0.15',
    calibrationUncertaintyK: '2',
    weightDensity: '8.0',
    status: 'in_service',
  },
  {
    identifier: 'BAL-SM1',
    description: 'Semi-micro balance, 82 g × 0.01 mg',
    location: 'Weighing room 2.14, bench 2 (draught shield)',
    capacityG: '82',
    readabilityMg: '0.01',
    repeatabilitySdMg: '0.006',
    minWeightMg: '12', // 2000 · max(0.006, 0.0041) mg
    minWeightDeterminedOn: '2026-06-16',
    minWeightSafetyFactor: '1', // lab rule: the USP <41> minimum weight itself; with SF 2 (USP <1251>) it doubles
    calibratedOn: '2026-06-16',
    calibrationDueOn: '2027-06-16',
    calibrationUncertaintyMg: '0.020',
    calibrationUncertaintyK: '2',
    weightDensity: '8.0',
    status: 'in_service',
  },
  {
    // In service but its calibration is overdue: the weighing gate must refuse it.
    identifier: 'BAL-A2',
    description: 'Analytical balance, 220 g × 0.1 mg (metals lab)',
    location: 'Metals lab 2.07',
    capacityG: '220',
    readabilityMg: '0.1',
    repeatabilitySdMg: '0.09',
    minWeightMg: '180', // 2000 · max(0.09, 0.041) mg
    minWeightDeterminedOn: '2025-05-20',
    minWeightSafetyFactor: '1', // lab rule: the USP <41> minimum weight itself; with SF 2 (USP <1251>) it doubles
    calibratedOn: '2025-05-20',
    calibrationDueOn: '2026-05-20',
    calibrationUncertaintyMg: '0.16',
    calibrationUncertaintyK: '2',
    weightDensity: '8.0',
    status: 'in_service',
  },
  {
    // Out of service (failed check, awaiting repair).
    identifier: 'BAL-T1',
    description: 'Top-loading balance, 2200 g × 10 mg',
    location: 'Media prep 2.03',
    capacityG: '2200',
    readabilityMg: '10',
    repeatabilitySdMg: '8',
    minWeightMg: '16000', // 2000 · max(8, 4.1) mg = 16 g
    minWeightDeterminedOn: '2026-01-12',
    minWeightSafetyFactor: '1', // lab rule: the USP <41> minimum weight itself; with SF 2 (USP <1251>) it doubles
    calibratedOn: '2026-01-12',
    calibrationDueOn: '2027-01-12',
    calibrationUncertaintyMg: '20',
    calibrationUncertaintyK: '2',
    weightDensity: '8.0',
    status: 'out_of_service',
  },
];

export interface DemoWare {
  identifier: string;
  kind: 'volumetric_flask' | 'bulb_pipette' | 'graduated_pipette' | 'piston_pipette';
  nominalVolumeMl: string;
  wareClass: 'A' | 'B' | 'n/a';
  toleranceMl: string;
  material: string;
  status: 'in_service' | 'out_of_service' | 'retired';
}

const BORO = 'borosilicate 3.3';
const flask = (ml: string, tol: string, n = '01', cls: 'A' | 'B' = 'A'): DemoWare => ({
  identifier: `VF-${ml}-${n}`,
  kind: 'volumetric_flask',
  nominalVolumeMl: ml,
  wareClass: cls,
  toleranceMl: tol,
  material: BORO,
  status: 'in_service',
});
const pipette = (ml: string, tol: string): DemoWare => ({
  identifier: `BP-${ml}-01`,
  kind: 'bulb_pipette',
  nominalVolumeMl: ml,
  wareClass: 'A',
  toleranceMl: tol,
  material: BORO,
  status: 'in_service',
});

export const demoVolumetricWare: DemoWare[] = [
  // ISO 1042 class A one-mark volumetric flasks (tolerances from memory).
  flask('10', '0.025'),
  flask('25', '0.04'),
  flask('50', '0.06'),
  flask('100', '0.10'),
  flask('100', '0.10', '02'),
  flask('100', '0.10', '03'),
  flask('250', '0.15'),
  flask('500', '0.25'),
  flask('1000', '0.40'),
  // A class B flask (ISO 1042: twice the class A tolerance), to show the class gate.
  flask('100', '0.20', 'B1', 'B'),
  // ISO 648 class A one-mark (bulb) pipettes (tolerances from memory).
  pipette('1', '0.008'),
  pipette('2', '0.010'),
  pipette('5', '0.015'),
  pipette('10', '0.020'),
  pipette('20', '0.030'),
  pipette('25', '0.030'),
  pipette('50', '0.050'),
  // ISO 835 class A graduated pipette, 10 mL (tolerance from memory).
  { identifier: 'GP-10-01', kind: 'graduated_pipette', nominalVolumeMl: '10', wareClass: 'A', toleranceMl: '0.05', material: BORO, status: 'in_service' },
  // Piston pipettes: ISO 8655-2 maximum systematic error at nominal volume, 0.8 % (from memory).
  { identifier: 'PP-1000-01', kind: 'piston_pipette', nominalVolumeMl: '1.000', wareClass: 'n/a', toleranceMl: '0.008', material: 'polypropylene tips', status: 'in_service' },
  { identifier: 'PP-200-01', kind: 'piston_pipette', nominalVolumeMl: '0.200', wareClass: 'n/a', toleranceMl: '0.0016', material: 'polypropylene tips', status: 'in_service' },
];

export interface DemoSolvent {
  name: string;
  grade: string;
  lot: string;
  density20c: string;
  expansionCoefficient: string;
  expiresOn: string | null;
  status: 'accepted' | 'quarantined' | 'retired';
}

export const demoSolvents: DemoSolvent[] = [
  {
    name: 'Ultrapure water',
    grade: 'type 1 (ISO 3696 grade 1), 18.2 MΩ·cm',
    lot: 'UPW-S1-2026-W49',
    density20c: '0.99820',
    expansionCoefficient: '0.000207',
    expiresOn: null, // drawn fresh from the purification system on the day of use
    status: 'accepted',
  },
  {
    name: 'Nitric acid 2 % (v/v)',
    grade: 'from trace-metal grade 67 % HNO3 in type 1 water',
    lot: 'HNO3-2-26-1130',
    density20c: '1.008', // estimate
    expansionCoefficient: '0.00025', // estimate: close to water's, slightly higher
    expiresOn: '2027-05-31',
    status: 'accepted',
  },
  {
    name: 'Methanol',
    grade: 'LC-MS grade',
    lot: 'MEOH-26-0417',
    density20c: '0.7914',
    expansionCoefficient: '0.0012',
    expiresOn: '2028-04-30',
    status: 'accepted',
  },
];
