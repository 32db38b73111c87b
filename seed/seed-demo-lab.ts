/**
 * Seeds the fictional demo lab into a migrated, empty database. Refuses in production.
 * The demo password is hashed once and shared by all demo accounts (bcrypt cost 10).
 */
import type { Sequelize } from 'sequelize';
import { Balance, initModels, modelsBoundTo, ReferenceMaterial, Solvent, User, VolumetricWare } from '../server/db/models/index.ts';
import { hashPassword } from '../server/services/passwords.ts';
import { seedDemoPreparations } from './demo-preparations.ts';
import { DEMO_PASSWORD, demoBalances, demoMaterials, demoSolvents, demoUsers, demoVolumetricWare } from './demo-data.ts';

export class SeedRefusedError extends Error {
  override name = 'SeedRefusedError';
}

export interface SeedResult {
  seeded: boolean;
  reason?: string;
  counts?: { users: number; materials: number; balances: number; volumetricWare: number; solvents: number };
}

export async function seedDemoLab(
  sequelize: Sequelize,
  opts: { env?: NodeJS.ProcessEnv; passwordHash?: string } = {},
): Promise<SeedResult> {
  const env = opts.env ?? process.env;
  if (env.NODE_ENV === 'production') {
    throw new SeedRefusedError('Refusing to seed the demo lab: NODE_ENV is "production"');
  }
  if (!modelsBoundTo(sequelize)) initModels(sequelize);
  if ((await User.count()) > 0) return { seeded: false, reason: 'The database already has users' };

  const passwordHash = opts.passwordHash ?? (await hashPassword(DEMO_PASSWORD));
  await sequelize.transaction(async (transaction) => {
    await User.bulkCreate(demoUsers.map((u) => ({ ...u, passwordHash })), { transaction });
    await ReferenceMaterial.bulkCreate(demoMaterials.map((m) => ({ ...m })), { transaction });
    await Balance.bulkCreate(demoBalances.map((b) => ({ ...b })), { transaction });
    await VolumetricWare.bulkCreate(demoVolumetricWare.map((w) => ({ ...w })), { transaction });
    await Solvent.bulkCreate(demoSolvents.map((s) => ({ ...s })), { transaction });
  });
  await seedDemoPreparations();
  return {
    seeded: true,
    counts: {
      users: demoUsers.length,
      materials: demoMaterials.length,
      balances: demoBalances.length,
      volumetricWare: demoVolumetricWare.length,
      solvents: demoSolvents.length,
    },
  };
}
