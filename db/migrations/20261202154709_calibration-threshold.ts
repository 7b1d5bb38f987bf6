/**
 * Calibration threshold (issue 16): when set, a rater must reach Gwet's AC1 ≥ calibration_min_ac1
 * and noise sensitivity ≥ calibration_min_sensitivity against the reference labels of the study's
 * calibration runs before live runs are assigned to them. NULL = no gate for that statistic.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.double('calibration_min_ac1').nullable();
    t.double('calibration_min_sensitivity').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.dropColumn('calibration_min_sensitivity');
    t.dropColumn('calibration_min_ac1');
  });
}
