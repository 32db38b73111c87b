/**
 * Schema changes by migrations only (never sync()). Migration files live in ./migrations, named
 * NNNN-name.ts, and export `up` / `down` taking `{ context: queryInterface }`.
 * The resolver imports each file from this module rather than from inside node_modules, so it also
 * works under vitest (STACK P5).
 */
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug, type MigrationMeta } from 'umzug';

export type MigrationContext = QueryInterface;

const MIGRATIONS_DIR = fileURLToPath(new URL('./migrations', import.meta.url));
/** .ts from source (tsx, vitest); .js when compiled to build/ (npm start). Names stay NNNN-name.ts either way. */
const EXT = import.meta.url.endsWith('.js') ? 'js' : 'ts';

export function createMigrator(sequelize: Sequelize, { log = false }: { log?: boolean } = {}) {
  return new Umzug<QueryInterface>({
    migrations: {
      glob: [`*.${EXT}`, { cwd: MIGRATIONS_DIR, ignore: ['*.d.ts'] }],
      resolve: ({ name, path, context }) => ({
        name: name.replace(/\.js$/, '.ts'),
        up: async () => (await import(pathToFileURL(path!).href)).up({ context }),
        down: async () => (await import(pathToFileURL(path!).href)).down({ context }),
      }),
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: log ? console : undefined,
  });
}

export async function migrateUp(sequelize: Sequelize, opts: { log?: boolean } = {}): Promise<MigrationMeta[]> {
  return createMigrator(sequelize, opts).up();
}

/** Reverts the last migration, or all of them down to `to` (0 = everything). */
export async function migrateDown(
  sequelize: Sequelize,
  opts: { to?: string | 0; log?: boolean } = {},
): Promise<MigrationMeta[]> {
  const migrator = createMigrator(sequelize, opts);
  return opts.to === undefined ? migrator.down() : migrator.down({ to: opts.to });
}
