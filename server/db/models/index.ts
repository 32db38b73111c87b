/**
 * Binds every model to one Sequelize instance. Models are module-level classes, so one process serves
 * one database at a time (each vitest file has its own module registry).
 */
import type { Sequelize } from 'sequelize';
import { initAuditEntry } from './audit-entry.model.ts';
import { initMaterialCertificate } from './certificate.model.ts';
import { initInventory } from './inventory.model.ts';
import { initSetting } from './setting.model.ts';
import { initUser } from './user.model.ts';

export { User } from './user.model.ts';
export { AuditEntry } from './audit-entry.model.ts';
export { Setting } from './setting.model.ts';
export { Balance, ReferenceMaterial, Solvent, VolumetricWare, type Analyte } from './inventory.model.ts';
export { MaterialCertificate } from './certificate.model.ts';

const bound = new WeakSet<Sequelize>();

export function initModels(sequelize: Sequelize) {
  const models = { User: initUser(sequelize), Setting: initSetting(sequelize), ...initInventory(sequelize) };
  initAuditEntry(sequelize);
  initMaterialCertificate(sequelize);
  bound.add(sequelize);
  return models;
}

export function modelsBoundTo(sequelize: Sequelize): boolean {
  return bound.has(sequelize);
}
