/**
 * Two leads deciding the same component at once (issue 13, faults): every write to a decision
 * raises its version; a lead's decision carries the version they saw, and one made against an
 * older version is refused (409) instead of silently replacing the other lead's decision.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('decisions', (t) => {
    t.integer('version').unsigned().notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('decisions', (t) => {
    t.dropColumn('version');
  });
}
