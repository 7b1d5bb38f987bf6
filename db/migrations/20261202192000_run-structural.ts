/**
 * Structural underlay (issue 14): a lead may attach a structural image already on the run's grid
 * (same dimensions and voxel-to-world transform as the run); the desk offers it as an alternative
 * underlay to the mean image. The storage key is made by the server; the name is the uploaded
 * file's, for display only.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('runs', (t) => {
    t.string('structural_key', 255).nullable();
    t.string('structural_name', 255).nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('runs', (t) => {
    t.dropColumn('structural_name');
    t.dropColumn('structural_key');
  });
}
