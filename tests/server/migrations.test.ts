// umzug migrations: up creates the tables (TEXT for measured values), down removes them, state in schema_migrations.
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { QueryTypes, UniqueConstraintError, type Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createMigrator, migrateDown, migrateUp } from '../../server/db/migrate.ts';
import { openDatabase } from '../../server/db/sequelize.ts';

let dir: string;
let sequelize: Sequelize;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tarebook-migrate-'));
  sequelize = await openDatabase(join(dir, 'm.sqlite'));
});
afterAll(async () => {
  await sequelize.close();
  rmSync(dir, { recursive: true, force: true });
});

/** The tables of the first two migrations (foundation and inventory); later migrations add more. */
const BASE_TABLES = ['balances', 'reference_materials', 'settings', 'solvents', 'users', 'volumetric_ware'];
/** Every migration file, in the order umzug runs them. */
const MIGRATIONS = readdirSync(new URL('../../server/db/migrations/', import.meta.url))
  .filter((f) => /^\d{4}-.+\.ts$/.test(f))
  .sort();
let allTables: string[] = [];

async function tables(): Promise<string[]> {
  const rows = await sequelize.query<{ name: string }>(
    "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.name);
}

async function columnTypes(table: string): Promise<Record<string, string>> {
  const rows = await sequelize.query<{ name: string; type: string }>(`PRAGMA table_info(${table})`, { type: QueryTypes.SELECT });
  return Object.fromEntries(rows.map((r) => [r.name, r.type]));
}

describe('migrations', () => {
  it('when opened, then the database is in WAL mode with foreign keys on', async () => {
    const [mode] = await sequelize.query<{ journal_mode: string }>('PRAGMA journal_mode', { type: QueryTypes.SELECT });
    expect(mode!.journal_mode).toBe('wal');
    const [fk] = await sequelize.query<{ foreign_keys: number }>('PRAGMA foreign_keys', { type: QueryTypes.SELECT });
    expect(fk!.foreign_keys).toBe(1);
  });

  it('when migrated up, then every table exists and the runs are recorded in schema_migrations', async () => {
    const applied = await migrateUp(sequelize);
    expect(applied.map((m) => m.name)).toEqual(MIGRATIONS);
    allTables = await tables();
    expect(allTables).toEqual(expect.arrayContaining([...BASE_TABLES, 'schema_migrations']));
    expect(await migrateUp(sequelize)).toEqual([]); // idempotent
    expect((await createMigrator(sequelize).pending()).length).toBe(0);
  });

  it('then measured values, dates and JSON are TEXT columns (SQLite DECIMAL would be a float)', async () => {
    const balances = await columnTypes('balances');
    for (const c of ['capacity_g', 'readability_mg', 'min_weight_mg', 'repeatability_sd_mg', 'weight_density', 'calibration_due_on', 'created_at']) {
      expect(balances[c], c).toBe('TEXT');
    }
    const materials = await columnTypes('reference_materials');
    for (const c of ['purity_value', 'purity_expanded_uncertainty', 'purity_k', 'density_value', 'analytes', 'ghs_pictograms', 'expires_on']) {
      expect(materials[c], c).toBe('TEXT');
    }
    expect((await columnTypes('solvents')).density_20c).toBe('TEXT');
    expect((await columnTypes('volumetric_ware')).tolerance_ml).toBe('TEXT');
  });

  it('then a TEXT column keeps "8.0" and 25 significant digits exactly', async () => {
    await sequelize.query(
      "INSERT INTO balances (identifier, description, capacity_g, readability_mg, weight_density) VALUES ('T-1', 't', '220.000', '0.1', '8.0')",
    );
    await sequelize.query("INSERT INTO solvents (name, lot, density_20c) VALUES ('x', 'y', '0.9982031234567890123456789')");
    const [b] = await sequelize.query<{ weight_density: string; capacity_g: string; created_at: string }>(
      "SELECT weight_density, capacity_g, created_at FROM balances WHERE identifier = 'T-1'",
      { type: QueryTypes.SELECT },
    );
    expect(b).toMatchObject({ weight_density: '8.0', capacity_g: '220.000' });
    expect(b!.created_at).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/); // DB default: UTC ISO
    const [s] = await sequelize.query<{ density_20c: string }>('SELECT density_20c FROM solvents', { type: QueryTypes.SELECT });
    expect(s!.density_20c).toBe('0.9982031234567890123456789');
  });

  it('then users.email is unique', async () => {
    const insert = "INSERT INTO users (email, full_name, initials, role, password_hash) VALUES ('a@b.example', 'A', 'A', 'qa', 'x')";
    await sequelize.query(insert);
    await expect(sequelize.query(insert)).rejects.toBeInstanceOf(UniqueConstraintError);
  });

  it('then a dilution result (0011) and the gravimetric readings (0012) are TEXT, and the readings are append-only', async () => {
    expect((await columnTypes('preparations')).dilution_result).toBe('TEXT');
    const g = await columnTypes('gravimetric_readings');
    for (const c of ['aliquot_reading', 'final_reading', 'unit', 'air_density', 'air_density_u', 'conditions', 'balance_snapshot', 'recorded_at']) expect(g[c], c).toBe('TEXT');
    const triggers = await sequelize.query<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'trigger' AND tbl_name = 'gravimetric_readings' ORDER BY name", { type: QueryTypes.SELECT });
    expect(triggers.map((x) => x.name)).toEqual(['gravimetric_readings_no_delete', 'gravimetric_readings_no_update']);
  });

  it('when migrated down to 0002, then every later migration is reverted and its tables go', async () => {
    const later = MIGRATIONS.filter((m) => m > '0002-inventory.ts');
    // umzug's down({ to }) reverts down to and including `to`.
    const reverted = later.length ? await migrateDown(sequelize, { to: later[0] }) : [];
    expect(reverted.map((m) => m.name)).toEqual([...later].reverse());
    expect(await tables()).toEqual([...BASE_TABLES, 'schema_migrations'].sort());
  });

  it('when migrated down one more step, then only the inventory tables go', async () => {
    const reverted = await migrateDown(sequelize);
    expect(reverted.map((m) => m.name)).toEqual(['0002-inventory.ts']);
    expect(await tables()).toEqual(['schema_migrations', 'settings', 'users']);
  });

  it('when migrated down to 0 and up again, then the schema is rebuilt from nothing', async () => {
    await migrateDown(sequelize, { to: 0 });
    expect(await tables()).toEqual(['schema_migrations']);
    await migrateUp(sequelize);
    expect(await tables()).toEqual(allTables);
    const [row] = await sequelize.query<{ value: string }>("SELECT value FROM settings WHERE key = 'labName'", { type: QueryTypes.SELECT });
    expect(JSON.parse(row!.value)).toBe('Harbourside Water Laboratory');
  });
});
