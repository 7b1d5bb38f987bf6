/**
 * The current-state agreement report of a study, stored (issue 12 item 3): the report page reads it
 * instead of running the 1000-resample bootstrap on every view. One row per study: the report JSON
 * (the shape releases.agreement_report keeps, lib/reports/agreement-report.ts), the number of runs
 * it covers, when it was computed, and the change key of the ratings it was computed from
 * (lib/db/queries/current-agreement.ts); a differing key means stale, and it is computed again.
 */
import type { Knex } from 'knex';
import { tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('study_agreement_reports', (t) => {
    tableDefaults(t);
    t.integer('study_id').unsigned().primary().references('studies.id').onDelete('CASCADE');
    t.string('change_key', 500).notNullable();
    t.specificType('report', 'LONGTEXT').notNullable();
    t.integer('run_count').unsigned().notNullable();
    t.datetime('computed_at', { precision: 3 }).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('study_agreement_reports');
}
