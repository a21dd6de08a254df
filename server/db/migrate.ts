import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { QueryInterface, Sequelize } from 'sequelize';
import { Umzug, SequelizeStorage, type MigrationParams } from 'umzug';
import pino from 'pino';

const here = path.dirname(fileURLToPath(import.meta.url));
const migrationsDir = path.resolve(here, '../migrations');

type MigrationModule = {
  up: (params: MigrationParams<QueryInterface>) => Promise<void>;
  down?: (params: MigrationParams<QueryInterface>) => Promise<void>;
};

export function createMigrator(sequelize: Sequelize, logger: Pick<Console, 'info' | 'warn' | 'error' | 'debug'> | undefined = undefined) {
  return new Umzug<QueryInterface>({
    migrations: {
      // NNNN-name.ts, applied in file-name order.
      glob: ['[0-9][0-9][0-9][0-9]-*.{ts,js}', { cwd: migrationsDir }],
      resolve: ({ name, path: file, context }) => ({
        name: name.replace(/\.(ts|js)$/, ''),
        up: async (params) => {
          const mod = (await import(pathToFileURL(file!).href)) as MigrationModule;
          return mod.up({ ...params, context });
        },
        down: async (params) => {
          const mod = (await import(pathToFileURL(file!).href)) as MigrationModule;
          if (!mod.down) throw new Error(`${name} has no down migration`);
          return mod.down({ ...params, context });
        },
      }),
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'migrations_applied' }),
    logger,
  });
}

/** Apply every pending migration; returns the names applied. */
export async function migrate(sequelize: Sequelize, logger?: pino.Logger): Promise<string[]> {
  const quiet = { info: () => {}, warn: console.warn, error: console.error, debug: () => {} };
  const log = logger
    ? {
        info: (m: unknown) => logger.info(m as object, 'migration'),
        warn: (m: unknown) => logger.warn(m as object, 'migration'),
        error: (m: unknown) => logger.error(m as object, 'migration'),
        debug: (m: unknown) => logger.debug(m as object, 'migration'),
      }
    : quiet;
  const applied = await createMigrator(sequelize, log).up();
  return applied.map((m) => m.name);
}

const invokedDirectly = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (invokedDirectly) {
  const { createSequelize } = await import('./sequelize.js');
  const sequelize = createSequelize();
  try {
    const names = await migrate(sequelize);
    console.log(names.length ? `Applied ${names.length} migration(s): ${names.join(', ')}` : 'The database is up to date.');
  } catch (err) {
    console.error(err);
    process.exitCode = 1;
  } finally {
    await sequelize.close();
  }
}
