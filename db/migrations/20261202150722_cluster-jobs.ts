/**
 * Cluster executor (issue 17): a decompose or denoise job run through Slurm keeps its cluster
 * submission on the job row, so a restarted worker re-attaches instead of submitting again, and
 * the runs table shows the cluster's view (pending with its reason, running on which node,
 * elapsed). cluster_name is the unique job name given to sbatch before the id is known (a worker
 * that died between sbatch and storing the id finds the submission by that name).
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.string('executor', 16).nullable();
    t.string('cluster_name', 64).nullable();
    t.string('cluster_job_id', 64).nullable();
    t.string('cluster_state', 32).nullable();
    t.string('cluster_reason', 255).nullable();
    t.string('cluster_node', 255).nullable();
    t.integer('cluster_elapsed_s').unsigned().nullable();
    t.dateTime('cluster_checked_at', { precision: 3 }).nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    for (const c of [
      'executor',
      'cluster_name',
      'cluster_job_id',
      'cluster_state',
      'cluster_reason',
      'cluster_node',
      'cluster_elapsed_s',
      'cluster_checked_at',
    ])
      t.dropColumn(c);
  });
}
