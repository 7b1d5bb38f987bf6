import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';

/** Throws when the database does not answer or is not migrated (no `users` table). */
export async function probeDatabase(conn: Knex = db): Promise<void> {
  await conn.raw('SELECT 1 FROM users LIMIT 1');
}
