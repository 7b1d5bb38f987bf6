/**
 * Integration tests' global setup (runs once, in vitest's main process):
 * 1. starts the private MariaDB with `bash scripts/db.sh start` unless DATABASE_URL is set;
 * 2. drops and recreates the test database (`quorum_test`, or QUORUM_DB_NAME);
 * 3. runs every migration in db/migrations;
 * 4. provides the connection settings to the tests (`inject('quorumDatabase')`), which
 *    setup-env.ts turns into NODE_ENV=test / QUORUM_DB_NAME for lib/db/config.ts.
 * The server is left running afterwards: it is shared with development and other test runs.
 */
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import knex from 'knex';
import type { TestProject } from 'vitest/node';
import { connectionOptions, knexLog, resolveDbSettings, type DbSettings } from '../../lib/db/config';
import { checkDatabase, createDb } from '../../lib/db/knex';
import { migrationSource } from '../../knexfile';

export type ProvidedDatabase = Omit<DbSettings, 'password'>;

declare module 'vitest' {
  export interface ProvidedContext {
    quorumDatabase: ProvidedDatabase;
  }
}

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/** Drops and recreates a database on the server of `settings` (the test user may do so for quorum_%). */
export async function recreateDatabase(settings: DbSettings, name: string): Promise<void> {
  if (!/test/i.test(name)) throw new Error(`refusing to drop \`${name}\`: test databases must have "test" in their name`);
  const server = knex({
    client: 'mysql2',
    connection: { ...connectionOptions(settings), database: undefined },
    pool: { min: 0, max: 1 },
    log: knexLog,
  });
  try {
    await server.raw('DROP DATABASE IF EXISTS ??', [name]);
    await server.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [name]);
  } finally {
    await server.destroy();
  }
}

export default async function setup(project: TestProject): Promise<void> {
  const env = { ...process.env, NODE_ENV: 'test' } as NodeJS.ProcessEnv & Record<string, string | undefined>;
  if (!env.DATABASE_URL) {
    execFileSync('bash', [path.join(root, 'scripts/db.sh'), 'start'], { cwd: root, env, stdio: ['ignore', 'pipe', 'inherit'] });
  }
  const settings = resolveDbSettings(env);
  await recreateDatabase(settings, settings.database);

  const conn = createDb(settings);
  try {
    await checkDatabase(conn, settings);
    await conn.migrate.latest({ migrationSource });
  } finally {
    await conn.destroy();
  }

  const { password: _password, ...provided } = settings;
  project.provide('quorumDatabase', provided);
  process.env.QUORUM_DB_NAME = settings.database;
}
