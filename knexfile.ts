/**
 * Knex configuration for the knex CLI (`npm run migrate`) and for programmatic migrations
 * (tests, start scripts). Connection settings come from lib/db/config.ts (DATABASE_URL, else the
 * private instance of scripts/db.sh; NODE_ENV=test / QUORUM_DB_NAME select the test database).
 */
import path from 'node:path';
import { readdir } from 'node:fs/promises';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Knex } from 'knex';
import { connectionOptions, knexLog, poolOptions, resolveDbSettings, type DbSettings } from './lib/db/config';

const here = path.dirname(fileURLToPath(import.meta.url));
export const migrationsDir = path.join(here, 'db', 'migrations');
export const seedsDir = path.join(here, 'db', 'seeds');

/** The CLI's configuration: migrations are the TypeScript files in db/migrations. */
export function knexConfig(settings: DbSettings = resolveDbSettings()): Knex.Config {
  return {
    client: 'mysql2',
    connection: connectionOptions(settings),
    pool: poolOptions,
    log: knexLog,
    acquireConnectionTimeout: 10_000,
    migrations: {
      directory: migrationsDir,
      extension: 'ts',
      loadExtensions: ['.ts'],
      tableName: 'knex_migrations',
    },
    seeds: {
      directory: seedsDir,
      extension: 'ts',
      loadExtensions: ['.ts'],
    },
  };
}

/**
 * A migration source that loads db/migrations/*.ts with dynamic import(), so migrations run in
 * any TypeScript-aware loader (tsx, vitest) without knex's require(). Use it as
 * `db.migrate.latest({ migrationSource })`.
 */
export const migrationSource: Knex.MigrationSource<string> = {
  async getMigrations() {
    const files = await readdir(migrationsDir);
    return files.filter((f) => /^\d.*\.ts$/.test(f) && !f.endsWith('.d.ts')).sort();
  },
  getMigrationName(name) {
    return name;
  },
  async getMigration(name) {
    const mod = await import(pathToFileURL(path.join(migrationsDir, name)).href);
    return (mod.default && typeof mod.default.up === 'function' ? mod.default : mod) as Knex.Migration;
  },
};

export default knexConfig();
