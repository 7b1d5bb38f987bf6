/**
 * Sessions that end (issue 13 item 5). users.session_version is copied into every session token at
 * sign-in and compared on every request: raising it ends all of the user's sessions (password
 * change and reset keep the session that made the change by re-issuing it; deactivation and an
 * admin's "sign out everywhere" end all; reactivation does not lower it, so old sessions stay
 * ended). ended_sessions holds the ids of single sessions ended by signing out, until the token
 * would have expired anyway (12 h).
 */
import type { Knex } from 'knex';
import { tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    t.integer('session_version').unsigned().notNullable().defaultTo(0);
  });
  await knex.schema.createTable('ended_sessions', (t) => {
    tableDefaults(t);
    t.string('sid', 64).primary();
    t.integer('user_id').unsigned().notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.dateTime('ended_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['ended_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('ended_sessions');
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('session_version');
  });
}
