// Drops and recreates one local test database (the name must start with quorum_ and must not be the
// development database). Usage: node --import tsx scripts/reset-database.ts quorum_e2e
import knex from 'knex';
import { connectionOptions, resolveDbSettings } from '../lib/db/config';

const name = process.argv[2] ?? '';
if (!/^quorum_[a-z0-9_]+$/.test(name)) {
  console.error(`reset-database: refusing "${name}": only quorum_<name> test databases can be reset here`);
  process.exit(2);
}
const settings = resolveDbSettings({ ...process.env, QUORUM_DB_NAME: name });
if (!['127.0.0.1', 'localhost', '::1'].includes(settings.host)) {
  console.error(`reset-database: refusing to reset a database on ${settings.host}; only local servers`);
  process.exit(2);
}
const { database: _omit, ...server } = connectionOptions(settings);
const conn = knex({ client: 'mysql2', connection: server });
try {
  await conn.raw(`DROP DATABASE IF EXISTS \`${name}\``);
  await conn.raw(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
} catch (err) {
  console.error(`reset-database: ${(err as Error).message.split('\n')[0]}`);
  process.exitCode = 1;
} finally {
  await conn.destroy();
}
