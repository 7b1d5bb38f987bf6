// The automatic decision of a component (lib/consensus/recompute.ts decides by the study's rule):
// its context, its row (created before it is locked), the votes that count, the write.
// No `server-only`: the worker's jobs recompute too.
import type { Knex } from 'knex';
import { parseJson } from '@/lib/db/knex';

/** The component's run and its study's rule, raters per run and noise kinds (null: no such component). */
export async function findConsensusContext(
  trx: Knex,
  { componentId }: { componentId: number },
): Promise<{ runId: number; rule: string; ratersPerRun: number; noiseKinds: string[] } | null> {
  const ctx = await trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .where('c.id', componentId)
    .first('r.id as runId', 's.consensus_rule as rule', 's.raters_per_run as ratersPerRun', 's.noise_kinds as noiseKinds');
  if (!ctx) return null;
  return { runId: ctx.runId, rule: ctx.rule, ratersPerRun: ctx.ratersPerRun, noiseKinds: parseJson<string[]>(ctx.noiseKinds, []) ?? [] };
}

/**
 * Creates the component's pending decision row if there is none (INSERT IGNORE on component_id);
 * true when it was created now. The row exists before it is locked: a locking read of a missing
 * row takes a gap lock, and votes on neighbouring components would then deadlock on their inserts.
 */
export async function ensureDecisionRow(trx: Knex, { componentId, runId }: { componentId: number; runId: number }): Promise<boolean> {
  const [inserted] = await trx('decisions')
    .insert({ component_id: componentId, run_id: runId, method: 'pending' })
    .onConflict('component_id')
    .ignore();
  return Number(inserted) > 0;
}

/** The component's decision row (id, method), locked FOR UPDATE; it must exist (ensureDecisionRow). */
export async function lockDecisionRow(trx: Knex, { componentId }: { componentId: number }): Promise<{ id: number; method: string }> {
  return trx('decisions').where({ component_id: componentId }).forUpdate().first('id', 'method');
}

/** How many raters are assigned to the run. */
export async function countRunAssignments(trx: Knex, { runId }: { runId: number }): Promise<number> {
  const [{ assigned }] = await trx('assignments').where({ run_id: runId }).count({ assigned: '*' });
  return Number(assigned);
}

/**
 * The votes on the component by raters assigned to its run (a rater removed from the run keeps
 * their votes in the database, but they no longer decide).
 */
export async function listAssignedVotes(
  trx: Knex,
  { componentId }: { componentId: number },
): Promise<Array<{ label: string; noiseKind: string | null }>> {
  return trx('votes as v')
    .join('assignments as a', function () {
      this.on('a.run_id', 'v.run_id').andOn('a.rater_id', 'v.rater_id');
    })
    .where('v.component_id', componentId)
    .select('v.label', 'v.noise_kind as noiseKind');
}

/** Writes the automatic decision; a row created just now keeps its first version, else version + 1. */
export async function writeAutomaticDecision(
  trx: Knex,
  { id, created, decision }: { id: number; created: boolean; decision: { label: string | null; noiseKind: string | null; method: string } },
): Promise<void> {
  const row = {
    label: decision.label,
    noise_kind: decision.noiseKind,
    method: decision.method,
    decided_by: null,
    reason: null,
    decided_at: decision.method === 'pending' ? null : trx.fn.now(3),
  };
  await trx('decisions')
    .where({ id })
    .update(created ? row : { ...row, version: trx.raw('version + 1') });
}

/** The ids of the components of the run's current decomposition. */
export async function listCurrentComponentIds(trx: Knex, { runId }: { runId: number }): Promise<number[]> {
  const rows = await trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .where({ 'd.run_id': runId, 'd.is_current': true })
    .select('c.id');
  return rows.map((r: { id: number }) => r.id);
}
