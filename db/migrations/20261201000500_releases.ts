/**
 * Releases: frozen, versioned exports of final decisions, for a whole study (run_id NULL) or one
 * run; release_decisions freezes each component's decision at release time.
 * MariaDB treats NULLs as distinct in unique keys, so uniqueness of (study, run, version) uses
 * the generated column run_key = IFNULL(run_id, 0).
 */
import type { Knex } from 'knex';
import { tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('releases', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('study_id').unsigned().notNullable().references('id').inTable('studies').onDelete('RESTRICT');
    t.integer('run_id').unsigned().nullable().references('id').inTable('runs').onDelete('RESTRICT');
    t.integer('version').unsigned().notNullable();
    t.integer('released_by').unsigned().notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.datetime('released_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.json('manifest').nullable(); // files with sha256 checksums, parameters, software version
    t.string('archive_key', 255).nullable(); // ZIP in storage, once written
    t.text('notes').nullable();
    t.index(['study_id', 'released_at'], 'releases_study_released_index');
  });
  await knex.raw(
    'ALTER TABLE releases ADD COLUMN run_key INT UNSIGNED AS (IFNULL(run_id, 0)) PERSISTENT, ' +
      'ADD UNIQUE KEY releases_study_run_version_unique (study_id, run_key, version)',
  );

  await knex.schema.createTable('release_decisions', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('release_id').unsigned().notNullable().references('id').inTable('releases').onDelete('CASCADE');
    t.integer('component_id').unsigned().notNullable().references('id').inTable('components').onDelete('RESTRICT');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('RESTRICT');
    t.integer('idx').unsigned().notNullable(); // component number at release time
    t.specificType('label', 'varchar(32)').notNullable();
    t.specificType('noise_kind', 'varchar(32)').nullable();
    t.enu('method', ['unanimous', 'majority', 'reconciled', 'override', 'pending']).notNullable();
    t.unique(['release_id', 'component_id'], { indexName: 'release_decisions_release_component_unique' });
    t.index(['release_id', 'run_id', 'idx'], 'release_decisions_release_run_index');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('release_decisions');
  await knex.schema.dropTableIfExists('releases');
}
