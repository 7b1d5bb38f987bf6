/**
 * Learned suggestions (issue 16): suggestion_models holds each trained model of a study (version
 * per study, the model JSON, its cross-validated report, the releases it learnt from);
 * suggestions holds one P(noise) per component and model; studies gains the switch that shows
 * suggestions to raters (after their own vote) and the model in use.
 */
import type { Knex } from 'knex';
import { createdAt, tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('suggestion_models', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('study_id').unsigned().notNullable().references('id').inTable('studies').onDelete('CASCADE');
    t.integer('version').unsigned().notNullable(); // 1, 2, … per study
    t.json('model').notNullable(); // SuggestionModelJson (lib/suggestions/model.ts)
    t.json('report').notNullable(); // ModelReport (lib/suggestions/cross-validate.ts)
    t.json('training').notNullable(); // { studies: [id], releases: [{ id, studyId, runId, version }] }
    t.integer('created_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    createdAt(knex, t);
    t.unique(['study_id', 'version'], { indexName: 'suggestion_models_study_version_unique' });
  });
  await knex.schema.createTable('suggestions', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('component_id').unsigned().notNullable().references('id').inTable('components').onDelete('CASCADE');
    t.integer('model_id').unsigned().notNullable().references('id').inTable('suggestion_models').onDelete('CASCADE');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    t.double('p_noise').notNullable(); // 0..1
    t.specificType('label', 'varchar(32)').notNullable(); // noise | signal at the model's threshold
    createdAt(knex, t);
    t.unique(['component_id', 'model_id'], { indexName: 'suggestions_component_model_unique' });
    t.index(['run_id', 'model_id'], 'suggestions_run_model_index');
  });
  await knex.schema.alterTable('studies', (t) => {
    t.boolean('suggestions_enabled').notNullable().defaultTo(false);
    t.integer('suggestion_model_id').unsigned().nullable().references('id').inTable('suggestion_models').onDelete('SET NULL');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.dropForeign(['suggestion_model_id']);
    t.dropColumn('suggestion_model_id');
    t.dropColumn('suggestions_enabled');
  });
  await knex.schema.dropTableIfExists('suggestions');
  await knex.schema.dropTableIfExists('suggestion_models');
}
