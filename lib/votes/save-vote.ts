import 'server-only';
import { recomputeDecision } from '@/lib/consensus/recompute';
import { recordAudit } from '@/lib/db/queries/audit';
import { isRunReleased } from '@/lib/db/queries/desk';
import { requireAssignedRun } from '@/lib/runs/assigned-run';
import { findRaterVote, lockDecompositionComponent, readRaterVote, writeVote } from '@/lib/db/queries/votes';
import { inTransaction } from '@/lib/db/transaction';
import type { VoteChange } from '@/lib/desk/schemas';
import type { SaveVoteResult, VoteFields } from '@/lib/desk/types';
import { AppError } from '@/lib/errors';

type Caller = { id: number };

const NOISE = 'noise';

/**
 * PUT /api/runs/:id/votes/:componentId — records the caller's vote on one component, in one
 * transaction with the decision recompute and the audit entry.
 * - The run must be assigned to the caller and not released; the component must belong to the
 *   run's current decomposition; label and noise kind must be in the study's sets.
 * - Optimistic concurrency: `baseVersion` is the version the browser last saw. When it differs
 *   (another tab or a retried request changed the vote meanwhile) the sent fields are merged into
 *   the stored vote — last write per field wins — and the merge is audited.
 * - A noise kind is kept only while the label is "noise".
 * - Repeating a change that is already stored changes nothing (safe to retry).
 * - After the rater submitted the run their votes are frozen (409) until a lead reopens the run
 *   for them; a change after a reopen is audited as such, and the vote as first submitted stays
 *   in submitted_votes.
 */
export async function saveVote({
  user,
  runId,
  componentId,
  change,
  ip,
}: {
  user: Caller;
  runId: number;
  componentId: number;
  change: VoteChange;
  ip?: string | null;
}): Promise<SaveVoteResult> {
  return inTransaction(async (trx) => {
    // Locking the assignment serialises every vote write of this rater on this run.
    const run = await requireAssignedRun({ user, runId, forUpdate: true }, trx);
    // Locking the component serialises the votes on it: its decision is recomputed from all of them.
    // Every read before this one is a locking read, so this transaction's snapshot (taken at its first
    // plain read, below) already holds the votes committed by the raters who held the lock before.
    const component = await lockDecompositionComponent(trx, { componentId, decompositionId: run.decompositionId });
    if (!component) {
      throw new AppError(
        'not_found',
        `Component ${componentId} is not a component of run ${runId}. Vote on the components shown on this run's desk.`,
      );
    }
    if (await isRunReleased({ runId }, trx)) {
      throw new AppError('conflict', `Run ${runId} has been released; its votes are frozen. Ask the study lead if a label must change.`);
    }
    if (run.submittedAt) {
      const day = new Date(run.submittedAt).toISOString().slice(0, 16).replace('T', ' ');
      throw new AppError(
        'conflict',
        `You submitted run ${runId} on ${day} UTC, so your votes on it are frozen. If a label must change, ask the study lead to reopen the run for you.`,
      );
    }
    const fields: Record<string, string[]> = {};
    if (change.label !== undefined && !run.labelSet.includes(change.label)) {
      fields.label = [`must be one of ${run.labelSet.join(', ')}`];
    }
    if (change.noiseKind != null && !run.noiseKinds.includes(change.noiseKind)) {
      fields.noiseKind = [`must be one of ${run.noiseKinds.join(', ')}`];
    }
    if (change.noiseKind != null && change.label !== undefined && change.label !== NOISE) {
      fields.noiseKind = [`a noise kind goes with the label "${NOISE}", not "${change.label}"`];
    }
    if (Object.keys(fields).length) {
      const [field, [msg]] = Object.entries(fields)[0];
      throw new AppError('validation', `The vote is not valid (${field}): ${msg}.`, fields);
    }

    const stored = await findRaterVote(trx, { componentId, raterId: user.id });
    const existing = stored?.vote;
    const before: VoteFields | null = existing
      ? { label: existing.label, noiseKind: existing.noiseKind, confidence: existing.confidence, note: existing.note }
      : null;
    const label = change.label ?? before?.label;
    if (!label) {
      throw new AppError(
        'validation',
        'The vote is not valid (label): choose signal, noise or uncertain before a noise kind, confidence or note.',
        {
          label: ['choose a label first'],
        },
      );
    }
    let noiseKind = change.noiseKind !== undefined ? change.noiseKind : (before?.noiseKind ?? null);
    if (noiseKind != null && change.noiseKind != null && change.label === undefined && label !== NOISE) {
      // A kind on its own turns the vote into "noise" of that kind.
      throw new AppError(
        'validation',
        `The vote is not valid (noiseKind): the vote is "${label}"; set the label to "${NOISE}" with the kind.`,
        {
          noiseKind: ['set the label to noise with the kind'],
        },
      );
    }
    if (label !== NOISE) noiseKind = null;
    const after: VoteFields = {
      label,
      noiseKind,
      confidence: change.confidence !== undefined ? change.confidence : (before?.confidence ?? null),
      note: change.note !== undefined ? (change.note?.trim() ? change.note : null) : (before?.note ?? null),
    };
    const changes: Record<string, [unknown, unknown]> = {};
    for (const key of ['label', 'noiseKind', 'confidence', 'note'] as const) {
      if ((before?.[key] ?? null) !== after[key]) changes[key] = [before?.[key] ?? null, after[key]];
    }
    const merged = Boolean(existing) && change.baseVersion !== Number(existing!.version);
    if (existing && Object.keys(changes).length === 0) {
      return { vote: existing, merged: false, changed: false };
    }
    await writeVote(trx, {
      existingId: stored?.id ?? null,
      componentId,
      runId,
      raterId: user.id,
      assignmentId: run.assignmentId,
      fields: after,
    });
    await recomputeDecision(trx, { componentId });
    await recordAudit(
      {
        actorId: user.id,
        action: existing ? 'vote.change' : 'vote.cast',
        targetType: 'component',
        targetId: componentId,
        studyId: run.studyId,
        detail: {
          runId,
          componentIdx: component.idx,
          changes,
          afterReopen: Boolean(run.firstSubmittedAt),
          ...(merged ? { merged: true, baseVersion: change.baseVersion, storedVersion: Number(existing!.version) } : {}),
        },
        ip,
      },
      trx,
    );
    const saved = await readRaterVote(trx, { componentId, raterId: user.id });
    return { vote: saved, merged, changed: true };
  });
}
