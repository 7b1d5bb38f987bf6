/**
 * Study protocol: what the desk does with components whose cross-restart reproducibility is below
 * a threshold (issue 11). flag (default): shown in order with a warning beside the value; last:
 * moved to the end of the rater's list; hide: not shown to raters (the lead decides them in
 * Reconcile). The threshold is a reproducibility index 0..1 (default 0.8).
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.enu('low_reproducibility', ['flag', 'last', 'hide']).notNullable().defaultTo('flag');
    t.double('reproducibility_threshold').notNullable().defaultTo(0.8);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.dropColumn('low_reproducibility');
    t.dropColumn('reproducibility_threshold');
  });
}
