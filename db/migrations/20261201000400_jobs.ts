/**
 * The job queue in MariaDB. Workers claim with
 *   SELECT … FROM jobs WHERE status = 'queued' AND run_after <= NOW(3)
 *   ORDER BY priority DESC, id FOR UPDATE SKIP LOCKED
 * (index jobs_claim_index), hold a lease (lease_owner, lease_expires_at) that they renew, report
 * stage + percent, and re-queue running jobs whose lease expired (jobs_lease_index).
 */
import type { Knex } from 'knex';
import { createdAt, tableDefaults, updatedAt } from '../schema-helpers';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('jobs', (t) => {
    tableDefaults(t);
    t.bigIncrements('id');
    t.string('kind', 64).notNullable(); // decompose, denoise, export, mail…
    t.json('payload').notNullable();
    t.enu('status', ['queued', 'running', 'succeeded', 'failed', 'cancelled']).notNullable().defaultTo('queued');
    t.integer('priority').notNullable().defaultTo(0); // higher first
    t.integer('attempts').unsigned().notNullable().defaultTo(0);
    t.integer('max_attempts').unsigned().notNullable().defaultTo(3);
    t.string('lease_owner', 128).nullable(); // worker id (host:pid:random)
    t.datetime('lease_expires_at', { precision: 3 }).nullable();
    t.datetime('run_after', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.string('stage', 64).nullable();
    t.double('percent').nullable(); // 0..100
    t.string('message', 1000).nullable();
    t.text('error').nullable();
    t.json('result').nullable();
    t.integer('run_id').unsigned().nullable().references('id').inTable('runs').onDelete('CASCADE');
    t.integer('study_id').unsigned().nullable().references('id').inTable('studies').onDelete('CASCADE');
    t.integer('created_by').unsigned().nullable().references('id').inTable('users').onDelete('SET NULL');
    createdAt(knex, t);
    updatedAt(knex, t);
    t.datetime('started_at', { precision: 3 }).nullable();
    t.datetime('finished_at', { precision: 3 }).nullable();
    t.index(['status', 'run_after', 'priority'], 'jobs_claim_index');
    t.index(['status', 'lease_expires_at'], 'jobs_lease_index');
    t.index(['kind', 'status'], 'jobs_kind_status_index');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('jobs');
}
