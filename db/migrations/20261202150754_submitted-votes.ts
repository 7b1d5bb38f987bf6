/**
 * Blinding after submission (issue 13 item 2). submitted_votes keeps each rater's vote on each
 * component as it stood when the rater first submitted the run: agreement statistics read these,
 * and a vote changed after a lead reopened the run never replaces them (the earlier vote stays in
 * the history). assignments gain first_submitted_at and the lead's reopenings (count, last time,
 * by whom). Existing submitted assignments are copied over as their first submission.
 */
import type { Knex } from 'knex';
import { tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('submitted_votes', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('component_id').unsigned().notNullable().references('id').inTable('components').onDelete('CASCADE');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    t.integer('rater_id').unsigned().notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.specificType('label', 'varchar(32)').notNullable();
    t.specificType('noise_kind', 'varchar(32)').nullable();
    t.tinyint('confidence').unsigned().nullable();
    t.text('note').nullable();
    t.datetime('submitted_at', { precision: 3 }).notNullable();
    t.unique(['component_id', 'rater_id'], { indexName: 'submitted_votes_component_rater_unique' });
    t.index(['run_id', 'rater_id'], 'submitted_votes_run_rater_index');
  });
  await knex.schema.alterTable('assignments', (t) => {
    t.datetime('first_submitted_at', { precision: 3 }).nullable();
    t.integer('reopen_count').unsigned().notNullable().defaultTo(0);
    t.datetime('reopened_at', { precision: 3 }).nullable();
    t.integer('reopened_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
  });
  await knex.raw('UPDATE assignments SET first_submitted_at = submitted_at WHERE submitted_at IS NOT NULL');
  await knex.raw(
    `INSERT INTO submitted_votes (component_id, run_id, rater_id, label, noise_kind, confidence, note, submitted_at)
     SELECT v.component_id, v.run_id, v.rater_id, v.label, v.noise_kind, v.confidence, v.note, a.submitted_at
     FROM votes v JOIN assignments a ON a.run_id = v.run_id AND a.rater_id = v.rater_id
     WHERE a.submitted_at IS NOT NULL`,
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assignments', (t) => {
    t.dropForeign(['reopened_by']);
    t.dropColumn('reopened_by');
    t.dropColumn('reopened_at');
    t.dropColumn('reopen_count');
    t.dropColumn('first_submitted_at');
  });
  await knex.schema.dropTable('submitted_votes');
}
