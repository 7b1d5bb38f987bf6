/**
 * Calibration set name and re-calibration (issue 16).
 * - studies.calibration_set_name: the name a lead gives the study's calibration set ("Autumn
 *   reference set"); the gate's reasons and the rater's result page refer to it. NULL = unnamed.
 * - studies.recalibration_weeks: certified raters get the calibration set again every N weeks
 *   (the `recalibrate` job); NULL = no re-calibration.
 * - calibration_rounds: one row per finished calibration round of a rater that a re-calibration
 *   closed (its pooled score against the reference at that time) and the rater's votes of that
 *   round (votes: component id, label, noise kind, confidence, note, time), so nothing is lost when
 *   they are cleared for the next round. The round in progress is computed live.
 */
import type { Knex } from 'knex';
import { createdAt, tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.string('calibration_set_name', 80).nullable();
    t.integer('recalibration_weeks').unsigned().nullable();
  });
  await knex.schema.createTable('calibration_rounds', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('study_id').unsigned().notNullable().references('id').inTable('studies').onDelete('CASCADE');
    t.integer('rater_id').unsigned().notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.integer('round').unsigned().notNullable();
    t.string('set_name', 80).nullable();
    t.datetime('submitted_at', { precision: 3 }).notNullable();
    t.integer('components').unsigned().notNullable();
    t.double('ac1').nullable();
    t.double('sensitivity').nullable();
    t.json('score').notNullable();
    t.json('votes').notNullable();
    createdAt(knex, t);
    t.unique(['study_id', 'rater_id', 'round'], { indexName: 'calibration_rounds_study_rater_round_unique' });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('calibration_rounds');
  await knex.schema.alterTable('studies', (t) => {
    t.dropColumn('recalibration_weeks');
    t.dropColumn('calibration_set_name');
  });
}
