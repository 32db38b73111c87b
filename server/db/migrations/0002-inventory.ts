/**
 * Inventory the demo lab needs: reference materials, balances, volumetric ware, solvents.
 * Every measured value is TEXT holding the decimal string exactly as entered (SQLite's DECIMAL is a
 * float and would drop "8.0" to 8). Dates are ISO "YYYY-MM-DD" TEXT; JSON columns are TEXT.
 */
import { DataTypes, Sequelize, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const NOW_ISO = Sequelize.literal(`(strftime('%Y-%m-%dT%H:%M:%fZ', 'now'))`);
const id = () => ({ type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true });
const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const stamps = () => ({
  created_at: { type: DataTypes.TEXT, allowNull: false, defaultValue: NOW_ISO },
  updated_at: { type: DataTypes.TEXT, allowNull: false, defaultValue: NOW_ISO },
});

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('reference_materials', {
    id: id(),
    name: text(false),
    formula: text(false),
    analytes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' }, // JSON [{ name, formula }]
    cas_number: text(),
    grade: text(false), // CRM | RM | reagent
    producer: text(false),
    catalogue_number: text(),
    lot: text(false),
    certificate_number: text(),
    purity_value: text(false), // mass fraction, e.g. "0.9995"
    purity_expanded_uncertainty: text(), // same unit as purity_value
    purity_k: text(),
    purity_standard_uncertainty: text(),
    purity_basis: text(false), // as-is | dried
    density_value: text(), // g/mL
    received_on: text(),
    opened_on: text(),
    expires_on: text(),
    storage: text(),
    ghs_hazard_statements: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' }, // JSON ["H302", …]
    ghs_pictograms: { type: DataTypes.TEXT, allowNull: false, defaultValue: '[]' }, // JSON ["GHS07", …]
    status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'quarantined' }, // accepted | quarantined | retired
    ...stamps(),
  });
  await qi.addIndex('reference_materials', ['name', 'lot'], { name: 'reference_materials_name_lot' });

  await qi.createTable('balances', {
    id: id(),
    identifier: { type: DataTypes.TEXT, allowNull: false, unique: true },
    description: text(false),
    location: text(),
    capacity_g: text(false),
    readability_mg: text(false), // d
    min_weight_mg: text(), // m_min (USP <41>: 2000·max(s, 0.41·d))
    min_weight_determined_on: text(),
    repeatability_sd_mg: text(), // s
    min_weight_safety_factor: text(),
    calibrated_on: text(),
    calibration_due_on: text(),
    calibration_uncertainty_mg: text(), // expanded, with calibration_uncertainty_k
    calibration_uncertainty_k: text(),
    weight_density: { type: DataTypes.TEXT, allowNull: false, defaultValue: '8.0' }, // g/mL, reference weights
    status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'in_service' }, // in_service | out_of_service
    ...stamps(),
  });

  await qi.createTable('volumetric_ware', {
    id: id(),
    identifier: { type: DataTypes.TEXT, allowNull: false, unique: true },
    kind: text(false), // volumetric_flask | bulb_pipette | graduated_pipette | piston_pipette
    nominal_volume_ml: text(false),
    class: text(false), // A | B | n/a
    tolerance_ml: text(),
    material: text(),
    status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'in_service' }, // in_service | out_of_service | retired
    ...stamps(),
  });

  await qi.createTable('solvents', {
    id: id(),
    name: text(false),
    grade: text(),
    lot: text(false),
    density_20c: text(), // g/mL at 20 °C
    expansion_coefficient: text(), // volume expansion, per K
    expires_on: text(),
    status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'accepted' }, // accepted | quarantined | retired
    ...stamps(),
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.dropTable('solvents');
  await qi.dropTable('volumetric_ware');
  await qi.dropTable('balances');
  await qi.dropTable('reference_materials');
}
