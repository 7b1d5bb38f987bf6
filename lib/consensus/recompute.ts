import type { Knex } from 'knex';
import { parseJson } from '@/lib/db/knex';
import { decideByRule, type ConsensusRule } from './rules';

/**
 * Recomputes the automatic decision of one component from its votes, inside the caller's
 * transaction (call it in the same transaction as the vote change). A lead's decision
 * (reconciled / override) is never replaced by this; everything else follows the study's rule.
 * Expected raters = the run's assignments (or the protocol's raters per run when none exist); only
 * assigned raters' votes count.
 */
export async function recomputeDecision(trx: Knex.Transaction | Knex, { componentId }: { componentId: number }): Promise<void> {
  const ctx = await trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .where('c.id', componentId)
    .first('r.id as runId', 's.consensus_rule as rule', 's.raters_per_run as ratersPerRun', 's.noise_kinds as noiseKinds');
  if (!ctx) return;
  // The row exists before it is locked: a locking read of a missing row takes a gap lock, and votes
  // on neighbouring components would then deadlock on their inserts.
  const [inserted] = await trx('decisions')
    .insert({ component_id: componentId, run_id: ctx.runId, method: 'pending' })
    .onConflict('component_id')
    .ignore();
  const created = Number(inserted) > 0;
  const existing = await trx('decisions').where({ component_id: componentId }).forUpdate().first('id', 'method');
  if (existing.method === 'reconciled' || existing.method === 'override') return;

  const [{ assigned }] = await trx('assignments').where({ run_id: ctx.runId }).count({ assigned: '*' });
  const expected = Number(assigned) || Number(ctx.ratersPerRun);
  // only the votes of raters assigned to the run count (a rater removed from the run keeps their
  // votes in the database, but they no longer decide)
  const votes = await trx('votes as v')
    .join('assignments as a', function () {
      this.on('a.run_id', 'v.run_id').andOn('a.rater_id', 'v.rater_id');
    })
    .where('v.component_id', componentId)
    .select('v.label', 'v.noise_kind as noiseKind');
  const decision = decideByRule(ctx.rule as ConsensusRule, votes, expected, parseJson<string[]>(ctx.noiseKinds, []) ?? []);
  const row = {
    label: decision.label,
    noise_kind: decision.noiseKind,
    method: decision.method,
    decided_by: null,
    reason: null,
    decided_at: decision.method === 'pending' ? null : trx.fn.now(3),
  };
  // a decision created just now keeps its first version
  await trx('decisions')
    .where({ id: existing.id })
    .update(created ? row : { ...row, version: trx.raw('version + 1') });
}

/** Recomputes every component of a run (after assignments change). */
export async function recomputeRunDecisions(trx: Knex.Transaction | Knex, { runId }: { runId: number }): Promise<void> {
  const rows = await trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .where({ 'd.run_id': runId, 'd.is_current': true })
    .select('c.id');
  for (const { id } of rows) await recomputeDecision(trx, { componentId: id });
}
