/**
 * audit_log (every vote change, decision, release, account and protocol change), mail_outbox
 * (e-mails written in the request, sent by the worker) and in-app notifications.
 * Audit rows outlive their actors and studies: those keys are SET NULL on delete.
 */
import type { Knex } from 'knex';
import { createdAt, tableDefaults } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_log', (t) => {
    tableDefaults(t);
    t.bigIncrements('id');
    t.integer('actor_id').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    t.string('action', 64).notNullable(); // e.g. vote.update, decision.reconcile, release.create
    t.string('target_type', 32).nullable();
    t.string('target_id', 64).nullable();
    t.integer('study_id').unsigned().nullable().references('id').inTable('studies').onDelete('SET NULL');
    t.json('detail').nullable();
    t.string('ip', 45).nullable();
    t.string('user_agent', 255).nullable();
    createdAt(knex, t);
    t.index(['study_id', 'created_at'], 'audit_log_study_created_index');
    t.index(['actor_id', 'created_at'], 'audit_log_actor_created_index');
    t.index(['action'], 'audit_log_action_index');
    t.index(['target_type', 'target_id'], 'audit_log_target_index');
    t.index(['created_at'], 'audit_log_created_index');
  });

  await knex.schema.createTable('mail_outbox', (t) => {
    tableDefaults(t);
    t.bigIncrements('id');
    t.string('to_email', 255).notNullable();
    t.string('subject', 255).notNullable();
    t.text('text_body', 'mediumtext').notNullable();
    t.text('html_body', 'mediumtext').nullable();
    t.string('template', 64).nullable(); // invite, reset, assignments…
    t.enu('status', ['queued', 'sending', 'sent', 'failed']).notNullable().defaultTo('queued');
    t.integer('attempts').unsigned().notNullable().defaultTo(0);
    t.text('last_error').nullable();
    t.datetime('send_after', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('sent_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    t.index(['status', 'send_after'], 'mail_outbox_status_send_after_index');
  });

  await knex.schema.createTable('notifications', (t) => {
    tableDefaults(t);
    t.bigIncrements('id');
    t.integer('user_id').unsigned().notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.string('kind', 64).notNullable();
    t.json('payload').nullable();
    t.datetime('read_at', { precision: 3 }).nullable();
    createdAt(knex, t);
    t.index(['user_id', 'read_at', 'created_at'], 'notifications_user_unread_index');
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const name of ['notifications', 'mail_outbox', 'audit_log']) {
    await knex.schema.dropTableIfExists(name);
  }
}
