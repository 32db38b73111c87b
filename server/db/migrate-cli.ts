/**
 * npm run migrate -- up            apply all pending migrations
 * npm run migrate -- down          revert the last migration
 * npm run migrate -- down --all    revert every migration
 * npm run migrate -- status        list executed and pending migrations
 * The database is TAREBOOK_DB (default ./data/tarebook.sqlite).
 */
import { resolve } from 'node:path';
import { openDatabase } from './sequelize.ts';
import { createMigrator, migrateDown, migrateUp } from './migrate.ts';

const [command = 'up', ...rest] = process.argv.slice(2);
const dbPath = resolve(process.env.TAREBOOK_DB || './data/tarebook.sqlite');
const sequelize = await openDatabase(dbPath);
try {
  if (command === 'up') {
    const done = await migrateUp(sequelize);
    console.log(done.length ? `Applied: ${done.map((m) => m.name).join(', ')}` : 'Nothing to apply');
  } else if (command === 'down') {
    const done = await migrateDown(sequelize, rest.includes('--all') ? { to: 0 } : {});
    console.log(done.length ? `Reverted: ${done.map((m) => m.name).join(', ')}` : 'Nothing to revert');
  } else if (command === 'status') {
    const migrator = createMigrator(sequelize);
    console.log('executed:', (await migrator.executed()).map((m) => m.name).join(', ') || '(none)');
    console.log('pending: ', (await migrator.pending()).map((m) => m.name).join(', ') || '(none)');
  } else {
    console.error(`Unknown command "${command}". Use: up | down [--all] | status`);
    process.exitCode = 2;
  }
  console.log(`Database: ${dbPath}`);
} finally {
  await sequelize.close();
}
