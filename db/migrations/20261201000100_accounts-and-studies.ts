/**
 * Accounts and studies: users, studies (with their rating protocol), study_members,
 * invitations (invite and password-reset links), personal_access_tokens, sign_in_throttles.
 * Conventions for every table: InnoDB, utf8mb4_unicode_ci, DATETIME(3) in UTC, INT UNSIGNED ids,
 * booleans as TINYINT(1), JSON as MariaDB JSON (LONGTEXT + json_valid).
 */
import type { Knex } from 'knex';
import { createdAt, tableDefaults, updatedAt } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.string('email', 255).notNullable().unique('users_email_unique'); // case-insensitive collation
    t.string('name', 200).notNullable();
    t.string('password_hash', 255).nullable(); // null until an invitation is accepted
    t.enu('role', ['admin', 'lead', 'rater', 'observer']).notNullable().defaultTo('rater');
    t.boolean('active').notNullable().defaultTo(true);
    t.datetime('last_sign_in_at', { precision: 3 }).nullable();
    t.integer('failed_sign_ins').unsigned().notNullable().defaultTo(0);
    t.datetime('locked_until', { precision: 3 }).nullable();
    createdAt(knex, t);
    updatedAt(knex, t);
    t.index(['role', 'active'], 'users_role_active_index');
  });

  await knex.schema.createTable('studies', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.string('name', 200).notNullable();
    t.text('description').nullable();
    t.string('slug', 120).nullable().unique('studies_slug_unique');
    t.integer('created_by').unsigned().notNullable().references('id').inTable('users').onDelete('RESTRICT');
    // protocol
    t.tinyint('raters_per_run').unsigned().notNullable().defaultTo(2);
    // unanimous: only unanimous votes decide; majority: a strict majority decides, ties go to the
    // lead; lead: any disagreement goes to the lead
    t.enu('consensus_rule', ['unanimous', 'majority', 'lead']).notNullable().defaultTo('majority');
    t.json('label_set').notNullable(); // e.g. ["signal","noise","uncertain"]
    t.json('noise_kinds').notNullable(); // keys, e.g. ["motion","pulsation",…]
    t.boolean('blinding').notNullable().defaultTo(true);
    t.boolean('show_votes_after_submit').notNullable().defaultTo(true);
    t.enu('uncertain_in_export', ['keep', 'remove']).notNullable().defaultTo('keep');
    t.integer('drop_volumes').unsigned().notNullable().defaultTo(0);
    // dimensionality estimate: laplace (Minka, the automatic default), aic, mdl, fixed, variance
    t.enu('dim_method', ['laplace', 'aic', 'mdl', 'fixed', 'variance']).notNullable().defaultTo('laplace');
    t.integer('fixed_components').unsigned().nullable();
    t.double('variance_fraction').nullable();
    t.boolean('variance_norm').notNullable().defaultTo(true);
    t.boolean('detrend').notNullable().defaultTo(false);
    t.boolean('archived').notNullable().defaultTo(false);
    createdAt(knex, t);
    updatedAt(knex, t);
    t.index(['archived', 'name'], 'studies_archived_name_index');
    t.check('?? between 1 and 5', ['raters_per_run'], 'studies_raters_per_run_check');
  });

  await knex.schema.createTable('study_members', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('study_id').unsigned().notNullable().references('id').inTable('studies').onDelete('CASCADE');
    t.integer('user_id').unsigned().notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.enu('study_role', ['lead', 'rater', 'observer']).notNullable();
    t.integer('added_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    createdAt(knex, t);
    t.unique(['study_id', 'user_id'], { indexName: 'study_members_study_user_unique' });
    t.index(['user_id', 'study_role'], 'study_members_user_role_index');
  });

  await knex.schema.createTable('invitations', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.enu('kind', ['invite', 'reset']).notNullable().defaultTo('invite');
    t.string('token_hash', 64).notNullable().unique('invitations_token_hash_unique'); // sha256 hex
    t.string('email', 255).notNullable();
    t.enu('role', ['admin', 'lead', 'rater', 'observer']).nullable(); // null for kind=reset
    t.integer('study_id').unsigned().nullable().references('id').inTable('studies').onDelete('SET NULL');
    t.enu('study_role', ['lead', 'rater', 'observer']).nullable();
    t.integer('user_id').unsigned().nullable().references('id').inTable('users').onDelete('CASCADE'); // reset: whose
    t.integer('invited_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('used_at', { precision: 3 }).nullable();
    t.datetime('revoked_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    t.index(['email', 'kind'], 'invitations_email_kind_index');
  });

  await knex.schema.createTable('personal_access_tokens', (t) => {
    tableDefaults(t);
    t.increments('id');
    t.integer('user_id').unsigned().notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.string('name', 120).notNullable();
    t.string('token_hash', 64).notNullable().unique('personal_access_tokens_token_hash_unique'); // sha256 hex
    t.string('token_prefix', 16).nullable(); // first characters, shown in the UI
    t.string('scope', 64).notNullable().defaultTo('releases:read');
    t.datetime('last_used_at', { precision: 3 }).nullable();
    t.datetime('expires_at', { precision: 3 }).nullable();
    t.datetime('revoked_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    t.index(['user_id', 'revoked_at'], 'personal_access_tokens_user_index');
  });

  // per-address ("ip:…") and per-account ("email:…") sign-in throttling
  await knex.schema.createTable('sign_in_throttles', (t) => {
    tableDefaults(t);
    t.string('key', 255).primary();
    t.integer('failures').unsigned().notNullable().defaultTo(0);
    t.datetime('window_start', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('locked_until', { precision: 3 }).nullable();
    updatedAt(knex, t);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['sign_in_throttles', 'personal_access_tokens', 'invitations', 'study_members', 'studies', 'users']) {
    await knex.schema.dropTableIfExists(name);
  }
}
