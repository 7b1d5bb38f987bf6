/**
 * Column conventions shared by the migrations: InnoDB, utf8mb4 with a case-insensitive collation,
 * and DATETIME(3) timestamps in UTC set by the server. Kept outside db/migrations so the
 * migration loader does not take it for a migration. Change with care: old migrations use it.
 */
import type { Knex } from 'knex';

export function tableDefaults(t: Knex.CreateTableBuilder) {
  t.engine('InnoDB');
  t.charset('utf8mb4');
  t.collate('utf8mb4_unicode_ci');
}

export function createdAt(knex: Knex, t: Knex.CreateTableBuilder) {
  t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
}

export function updatedAt(knex: Knex, t: Knex.CreateTableBuilder) {
  t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3)'));
}
