import 'server-only';
import { db } from '@/lib/db/knex';
import { AppError } from '@/lib/errors';
import { recomputeDecision } from '@/lib/consensus/recompute';
import type { MyVote, OtherVote, SaveVoteResult, VoteFields, VotesPayload } from '@/lib/desk/types';
import type { VoteChange } from '@/lib/desk/schemas';
import { findAssignedRun, isRunReleased } from './desk';
import { recordAudit } from './audit';

type Caller = { id: number };

const NOISE = 'noise';

type VoteRow = { id: number; componentId: number; label: string; noiseKind: string | null; confidence: number | null; note: string | null; version: number; updatedAt: Date };

const voteColumns = [
  'v.id',
  'v.component_id as componentId',
  'v.label',
  'v.noise_kind as noiseKind',
  'v.confidence',
  'v.note',
  'v.version',
  'v.updated_at as updatedAt',
] as const;

function toMyVote(r: VoteRow): MyVote {
  return {
    componentId: r.componentId,
    label: r.label,
    noiseKind: r.noiseKind,
    confidence: r.confidence == null ? null : Number(r.confidence),
    note: r.note,
    version: Number(r.version),
    updatedAt: new Date(r.updatedAt).toISOString(),
  };
}

/**
 * Whether a rater may see the other raters' votes now, and why not: under blinding only once they
 * have submitted the run themselves ('not_submitted' before); never when the study hides them
 * ('study_hides'). Null when they are shown.
 */
export function othersHiddenReason(run: { blinding: boolean; showVotesAfterSubmit: boolean; submittedAt: unknown }): VotesPayload['status']['othersHidden'] {
  if (run.blinding && !run.submittedAt) return 'not_submitted';
  if (!run.showVotesAfterSubmit) return 'study_hides';
  return null;
}

/**
 * GET /api/runs/:id/votes — the caller's own votes on the run, the assignment's status, and the
 * other raters' votes only when othersHiddenReason allows it — and then only the votes of raters
 * who have submitted the run themselves (work in progress, or a run a lead reopened for its rater,
 * is never shown). While they are hidden the query for other raters' votes is never run.
 */
export async function listVotesForRater({ user, runId }: { user: Caller; runId: number }): Promise<VotesPayload> {
  const run = await findAssignedRun({ user, runId });
  const mine = await db('votes as v')
    .join('components as c', 'c.id', 'v.component_id')
    .where({ 'v.run_id': runId, 'v.rater_id': user.id, 'c.decomposition_id': run.decompositionId })
    .orderBy('c.idx')
    .select(voteColumns);
  const released = await isRunReleased({ runId });
  const othersHidden = othersHiddenReason(run);
  let others: OtherVote[] | null = null;
  if (othersHidden === null) {
    const rows = await db('votes as v')
      .join('components as c', 'c.id', 'v.component_id')
      .join('users as u', 'u.id', 'v.rater_id')
      .join('assignments as a', function () {
        this.on('a.run_id', 'v.run_id').andOn('a.rater_id', 'v.rater_id');
      })
      .where({ 'v.run_id': runId, 'c.decomposition_id': run.decompositionId })
      .whereNotNull('a.submitted_at')
      .whereNot('v.rater_id', user.id)
      .orderBy(['c.idx', 'u.name'])
      .select('v.component_id as componentId', 'u.name as raterName', 'v.label', 'v.noise_kind as noiseKind', 'v.confidence', 'v.note');
    others = rows.map((r) => ({ ...r, confidence: r.confidence == null ? null : Number(r.confidence) }));
  }
  return {
    status: { submittedAt: run.submittedAt ? new Date(run.submittedAt).toISOString() : null, released, othersHidden },
    mine: mine.map(toMyVote),
    others,
  };
}

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
  return db.transaction(async (trx) => {
    // Locking the assignment serialises every vote write of this rater on this run.
    const run = await findAssignedRun({ user, runId, forUpdate: true }, trx);
    // Locking the component serialises the votes on it: its decision is recomputed from all of them.
    // Every read before this one is a locking read, so this transaction's snapshot (taken at its first
    // plain read, below) already holds the votes committed by the raters who held the lock before.
    const component = await trx('components').where({ id: componentId, decomposition_id: run.decompositionId }).forUpdate().first('id', 'idx');
    if (!component) {
      throw new AppError('not_found', `Component ${componentId} is not a component of run ${runId}. Vote on the components shown on this run's desk.`);
    }
    if (await isRunReleased({ runId }, trx)) {
      throw new AppError('conflict', `Run ${runId} has been released; its votes are frozen. Ask the study lead if a label must change.`);
    }
    if (run.submittedAt) {
      const day = new Date(run.submittedAt).toISOString().slice(0, 16).replace('T', ' ');
      throw new AppError('conflict', `You submitted run ${runId} on ${day} UTC, so your votes on it are frozen. If a label must change, ask the study lead to reopen the run for you.`);
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

    // no locking read: the component and assignment locks above already guard this row, and a locking
    // read of a missing row would take a gap lock that deadlocks votes on neighbouring components
    const existing = (await trx('votes as v').where({ 'v.component_id': componentId, 'v.rater_id': user.id }).first(voteColumns)) as
      | VoteRow
      | undefined;
    const before: VoteFields | null = existing
      ? { label: existing.label, noiseKind: existing.noiseKind, confidence: existing.confidence == null ? null : Number(existing.confidence), note: existing.note }
      : null;
    const label = change.label ?? before?.label;
    if (!label) {
      throw new AppError('validation', 'The vote is not valid (label): choose signal, noise or uncertain before a noise kind, confidence or note.', {
        label: ['choose a label first'],
      });
    }
    let noiseKind = change.noiseKind !== undefined ? change.noiseKind : (before?.noiseKind ?? null);
    if (noiseKind != null && change.noiseKind != null && change.label === undefined && label !== NOISE) {
      // A kind on its own turns the vote into "noise" of that kind.
      throw new AppError('validation', `The vote is not valid (noiseKind): the vote is "${label}"; set the label to "${NOISE}" with the kind.`, {
        noiseKind: ['set the label to noise with the kind'],
      });
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
      return { vote: toMyVote(existing), merged: false, changed: false };
    }
    const row = { label: after.label, noise_kind: after.noiseKind, confidence: after.confidence, note: after.note };
    if (existing) {
      await trx('votes').where({ id: existing.id }).update({ ...row, version: trx.raw('version + 1') });
    } else {
      await trx('votes').insert({ component_id: componentId, run_id: runId, rater_id: user.id, ...row, version: 1 });
      await trx('assignments').where({ id: run.assignmentId }).update({ started_at: trx.raw('COALESCE(started_at, CURRENT_TIMESTAMP(3))') });
    }
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
    const saved = (await trx('votes as v').where({ 'v.component_id': componentId, 'v.rater_id': user.id }).first(voteColumns)) as VoteRow;
    return { vote: toMyVote(saved), merged, changed: true };
  });
}
