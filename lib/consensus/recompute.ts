import {
  countRunAssignments,
  ensureDecisionRow,
  findConsensusContext,
  listAssignedVotes,
  listCurrentComponentIds,
  lockDecisionRow,
  writeAutomaticDecision,
} from '@/lib/db/queries/consensus';
import type { Db } from '@/lib/db/transaction';
import { decideByRule, type ConsensusRule } from './rules';

/**
 * Recomputes the automatic decision of one component from its votes, inside the caller's
 * transaction (call it in the same transaction as the vote change). A lead's decision
 * (reconciled / override) is never replaced by this; everything else follows the study's rule.
 * Expected raters = the run's assignments (or the protocol's raters per run when none exist); only
 * assigned raters' votes count.
 */
export async function recomputeDecision(trx: Db, { componentId }: { componentId: number }): Promise<void> {
  const ctx = await findConsensusContext(trx, { componentId });
  if (!ctx) return;
  // The row exists before it is locked: a locking read of a missing row takes a gap lock, and votes
  // on neighbouring components would then deadlock on their inserts.
  const created = await ensureDecisionRow(trx, { componentId, runId: ctx.runId });
  const existing = await lockDecisionRow(trx, { componentId });
  if (existing.method === 'reconciled' || existing.method === 'override') return;

  const expected = (await countRunAssignments(trx, { runId: ctx.runId })) || Number(ctx.ratersPerRun);
  // only the votes of raters assigned to the run count
  const votes = await listAssignedVotes(trx, { componentId });
  const decision = decideByRule(ctx.rule as ConsensusRule, votes, expected, ctx.noiseKinds);
  // a decision created just now keeps its first version
  await writeAutomaticDecision(trx, { id: existing.id, created, decision });
}

/** Recomputes every component of a run (after assignments change). */
export async function recomputeRunDecisions(trx: Db, { runId }: { runId: number }): Promise<void> {
  for (const componentId of await listCurrentComponentIds(trx, { runId })) await recomputeDecision(trx, { componentId });
}
