/** npm run seed: migrate TAREBOOK_DB, then seed the demo lab if it has no users. */
import { resolve } from 'node:path';
import { migrateUp } from '../server/db/migrate.ts';
import { openDatabase } from '../server/db/sequelize.ts';
import { seedDemoLab } from './seed-demo-lab.ts';

const dbPath = resolve(process.env.TAREBOOK_DB || './data/tarebook.sqlite');
const sequelize = await openDatabase(dbPath);
try {
  await migrateUp(sequelize);
  const result = await seedDemoLab(sequelize);
  if (result.seeded) {
    console.log(`Seeded the demo lab into ${dbPath}:`, result.counts);
  } else {
    console.log(`Not seeded (${result.reason}): ${dbPath}`);
  }
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exitCode = 1;
} finally {
  await sequelize.close();
}
