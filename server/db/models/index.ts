/**
 * Binds every model to one Sequelize instance. Models are module-level classes, so one process serves
 * one database at a time (each vitest file has its own module registry).
 */
import type { Sequelize } from 'sequelize';
import { initAuditEntry } from './audit-entry.model.ts';
import { initMaterialCertificate } from './certificate.model.ts';
import { initInventory } from './inventory.model.ts';
import { initMakeUp } from './make-up.model.ts';
import { initPreparations } from './preparation.model.ts';
import { initSetting } from './setting.model.ts';
import { initUser } from './user.model.ts';
import { initWeighing } from './weighing.model.ts';
import { initPrinting } from './printing.model.ts';
import { initSignatures } from './signature.model.ts';
import { initMail } from './mail.model.ts';
import { initLineage } from './lineage.model.ts';
import { initGravimetric } from './gravimetric.model.ts';
import { initExpiryExtensions } from './expiry-extension.ts';
import { initVolumeChecks } from './volume-check.model.ts';

export { User } from './user.model.ts';
export { AuditEntry } from './audit-entry.model.ts';
export { Setting } from './setting.model.ts';
export { Balance, ReferenceMaterial, Solvent, VolumetricWare, type Analyte } from './inventory.model.ts';
export { MaterialCertificate } from './certificate.model.ts';
export { Preparation, PreparationEvent, PreparationSequence, type StoredPlan } from './preparation.model.ts';
export { Weighing } from './weighing.model.ts';
export { MakeUp } from './make-up.model.ts';
export { LabelPrint, LabelTemplate, type LabelSnapshot, type TemplateSnapshot } from './printing.model.ts';
export { Signature, RecordVersion, SignatureAcknowledgement, ReviewFlag } from './signature.model.ts';
export { MailQueueItem, FakeMail, type MailStatus } from './mail.model.ts';
export { PreparationParent, DilutionAliquot, Series } from './lineage.model.ts';
export { GravimetricReading } from './gravimetric.model.ts';
export { ExpiryExtension, expiryAsSigned } from './expiry-extension.ts';
export { VolumeCheck, VolumeCheckReading, VolumeCheckSignature } from './volume-check.model.ts';

const bound = new WeakSet<Sequelize>();

export function initModels(sequelize: Sequelize) {
  const models = { User: initUser(sequelize), Setting: initSetting(sequelize), ...initInventory(sequelize) };
  initAuditEntry(sequelize);
  initMaterialCertificate(sequelize);
  initPreparations(sequelize);
  initWeighing(sequelize);
  initMakeUp(sequelize);
  initPrinting(sequelize);
  initSignatures(sequelize);
  initMail(sequelize);
  initLineage(sequelize);
  initGravimetric(sequelize);
  initExpiryExtensions(sequelize);
  initVolumeChecks(sequelize);
  bound.add(sequelize);
  return models;
}

export function modelsBoundTo(sequelize: Sequelize): boolean {
  return bound.has(sequelize);
}
