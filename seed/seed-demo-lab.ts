/**
 * Seeds the fictional demo lab into a migrated, empty database. Refuses in production.
 * The demo password is hashed once and shared by all demo accounts (bcrypt cost 10).
 */
import type { Sequelize } from 'sequelize';
import { Balance, initModels, modelsBoundTo, ReferenceMaterial, Solvent, User, VolumetricWare } from '../server/db/models/index.ts';
import { hashPassword } from '../server/services/passwords.ts';
import { seedDemoPreparations } from './demo-preparations.ts';
import { seedDemoVolumeChecks } from './demo-volume-checks.ts';
import { seedDemoWorkingStandards } from './demo-working-standards.ts';
import { DEMO_PASSWORD, demoBalances, demoMaterials, demoSolvents, demoUsers, demoVolumetricWare } from './demo-data.ts';
import { shiftDemoRecord } from './demo-clock.ts';

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
  opts: {
    env?: NodeJS.ProcessEnv;
    passwordHash?: string;
    /** the seeding day (demo dates move with it, seed/demo-clock.ts) */
    now?: Date;
    /**
     * the working standards of seed/demo-working-standards.ts (default true). The test harness leaves them out
     * unless a test asks (tests/server/helpers/test-app.ts): most tests build their own records, and the full
     * demo takes several seconds more to seed.
     */
    workingStandards?: boolean;
  } = {},
): Promise<SeedResult> {
  const env = opts.env ?? process.env;
  if (env.NODE_ENV === 'production') {
    throw new SeedRefusedError('Refusing to seed the demo lab: NODE_ENV is "production"');
  }
  if (!modelsBoundTo(sequelize)) initModels(sequelize);
  if ((await User.count()) > 0) return { seeded: false, reason: 'The database already has users' };

  const now = opts.now ?? new Date();
  const passwordHash = opts.passwordHash ?? (await hashPassword(DEMO_PASSWORD));
  await sequelize.transaction(async (transaction) => {
    // Demo passwords are not temporary (mustChangePassword false): the README gives them to everyone on purpose.
    await User.bulkCreate(demoUsers.map((u) => ({ ...u, passwordHash, mustChangePassword: false })), { transaction });
    const shifted = <T extends object>(rows: T[]) => rows.map((r) => shiftDemoRecord(r, now));
    await ReferenceMaterial.bulkCreate(shifted(demoMaterials), { transaction });
    await Balance.bulkCreate(shifted(demoBalances), { transaction });
    await VolumetricWare.bulkCreate(shifted(demoVolumetricWare), { transaction });
    await Solvent.bulkCreate(shifted(demoSolvents), { transaction });
  });
  await seedDemoPreparations(now);
  await seedDemoVolumeChecks(now);
  if (opts.workingStandards !== false) await seedDemoWorkingStandards(now);
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
