/**
 * Rating: assignments (which rater rates which run), votes (one per component and rater),
 * decisions (the final label of a component and how it was reached), reference_labels
 * (lead-set labels for calibration runs) and rater_certifications.
 * votes.run_id and decisions.run_id repeat the component's run so per-run queries (blinding,
 * agreement, reconcile queues) need no three-table join.
 */
import type { Knex } from 'knex';
import { createdAt, tableDefaults, updatedAt } from '../schema-helpers';

const LABEL = 'varchar(32)'; // a key of the study's label_set (signal, noise, uncertain…)
const KIND = 'varchar(32)'; // a key of the study's noise_kinds

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('assignments', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    t.integer('rater_id').unsigned().notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.integer('assigned_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('due_at', { precision: 3 }).nullable();
    t.datetime('started_at', { precision: 3 }).nullable();
    t.integer('last_component_idx').unsigned().nullable(); // where the rater stopped
    t.datetime('submitted_at', { precision: 3 }).nullable();
    t.datetime('notified_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    t.unique(['run_id', 'rater_id'], { indexName: 'assignments_run_rater_unique' });
    t.index(['rater_id', 'submitted_at'], 'assignments_rater_submitted_index');
  });

  await knex.schema.createTable('votes', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('component_id').unsigned().notNullable().references('id').inTable('components').onDelete('CASCADE');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    t.integer('rater_id').unsigned().notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.specificType('label', LABEL).notNullable();
    t.specificType('noise_kind', KIND).nullable();
    t.tinyint('confidence').unsigned().nullable(); // 1 (low) … 5 (high); TINYINT(3), never read as boolean
    t.text('note').nullable();
    t.integer('version').unsigned().notNullable().defaultTo(1); // +1 per change (optimistic concurrency)
    createdAt(knex, t);
    updatedAt(knex, t);
    t.unique(['component_id', 'rater_id'], { indexName: 'votes_component_rater_unique' });
    t.index(['run_id', 'rater_id'], 'votes_run_rater_index');
    t.check('?? is null or ?? between 1 and 5', ['confidence', 'confidence'], 'votes_confidence_check');
  });

  await knex.schema.createTable('decisions', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('component_id')
      .unsigned()
      .notNullable()
      .unique('decisions_component_unique')
      .references('id')
      .inTable('components')
      .onDelete('CASCADE');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    t.specificType('label', LABEL).nullable(); // null while pending
    t.specificType('noise_kind', KIND).nullable();
    t.enu('method', ['unanimous', 'majority', 'reconciled', 'override', 'pending']).notNullable().defaultTo('pending');
    t.integer('decided_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.text('reason').nullable();
    t.datetime('decided_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    updatedAt(knex, t);
    t.index(['run_id', 'method'], 'decisions_run_method_index');
  });

  await knex.schema.createTable('reference_labels', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('component_id')
      .unsigned()
      .notNullable()
      .unique('reference_labels_component_unique')
      .references('id')
      .inTable('components')
      .onDelete('CASCADE');
    t.specificType('label', LABEL).notNullable();
    t.specificType('noise_kind', KIND).nullable();
    t.integer('set_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    createdAt(knex, t);
    updatedAt(knex, t);
  });

  await knex.schema.createTable('rater_certifications', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('study_id').unsigned().notNullable().references('id').inTable('studies').onDelete('CASCADE');
    t.integer('user_id').unsigned().notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.json('scores').nullable(); // agreement with the reference labels (κ, AC1, percent…)
    t.boolean('passed').notNullable().defaultTo(false);
    t.integer('certified_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('certified_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    t.unique(['study_id', 'user_id'], { indexName: 'rater_certifications_study_user_unique' });
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['rater_certifications', 'reference_labels', 'decisions', 'votes', 'assignments']) {
    await knex.schema.dropTableIfExists(name);
  }
}
