/**
 * Opens the SQLite database through Sequelize.
 * journal_mode=WAL is stored in the file; Sequelize itself turns foreign keys on for every connection it
 * opens, and busy_timeout applies to the default connection only (STACK P6): keep write transactions short.
 */
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { Sequelize } from 'sequelize';

export async function openDatabase(dbPath: string): Promise<Sequelize> {
  if (dbPath !== ':memory:') mkdirSync(dirname(dbPath), { recursive: true });
  const sequelize = new Sequelize({
    dialect: 'sqlite',
    storage: dbPath,
    logging: false,
    define: { underscored: true, freezeTableName: true },
  });
  await sequelize.authenticate();
  await sequelize.query('PRAGMA journal_mode=WAL;');
  await sequelize.query('PRAGMA foreign_keys=ON;');
  await sequelize.query('PRAGMA busy_timeout=5000;');
  return sequelize;
}
