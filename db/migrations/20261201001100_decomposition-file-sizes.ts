/**
 * Storage use per study: decompositions record the bytes of the files they wrote (component maps,
 * mean image, mask) so the facility page can sum them with runs.size_bytes without touching disk.
 * NULL = not recorded (older rows); the worker fills it when it stores a decomposition.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('decompositions', (t) => {
    t.bigInteger('files_bytes').unsigned().nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('decompositions', (t) => {
    t.dropColumn('files_bytes');
  });
}
