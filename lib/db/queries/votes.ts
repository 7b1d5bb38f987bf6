import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';
import type { MyVote, OtherVote, VoteFields, VotesPayload } from '@/lib/desk/types';
import { isRunReleased, type AssignedRun } from './desk';

type Caller = { id: number };

type VoteRow = {
  id: number;
  componentId: number;
  label: string;
  noiseKind: string | null;
  confidence: number | null;
  note: string | null;
  version: number;
  updatedAt: Date;
};

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
export function othersHiddenReason(run: {
  blinding: boolean;
  showVotesAfterSubmit: boolean;
  submittedAt: unknown;
}): VotesPayload['status']['othersHidden'] {
  if (run.blinding && !run.submittedAt) return 'not_submitted';
  if (!run.showVotesAfterSubmit) return 'study_hides';
  return null;
}

/**
 * GET /api/runs/:id/votes (lib/votes/list-votes-for-rater.ts) — the caller's own votes on the run, the assignment's status, and the
 * other raters' votes only when othersHiddenReason allows it — and then only the votes of raters
 * who have submitted the run themselves (work in progress, or a run a lead reopened for its rater,
 * is never shown). While they are hidden the query for other raters' votes is never run.
 */
export async function votesPayloadOf({ user, run }: { user: Caller; run: AssignedRun }): Promise<VotesPayload> {
  const runId = Number(run.runId);
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

/** The component (id and index) when it belongs to the given decomposition, its row locked for the caller's transaction. */
export async function lockDecompositionComponent(
  trx: Knex.Transaction,
  { componentId, decompositionId }: { componentId: number; decompositionId: number },
): Promise<{ id: number; idx: number } | undefined> {
  return trx('components').where({ id: componentId, decomposition_id: decompositionId }).forUpdate().first('id', 'idx');
}

/**
 * The rater's vote on a component with its row id. A plain read: the caller holds the component's
 * and the assignment's locks, which guard this row; a locking read of a missing row would take a gap
 * lock that deadlocks first votes on neighbouring components (DEVELOPERS.md, "Row locks").
 */
export async function findRaterVote(
  trx: Knex.Transaction,
  { componentId, raterId }: { componentId: number; raterId: number },
): Promise<{ id: number; vote: MyVote } | undefined> {
  const row = (await trx('votes as v').where({ 'v.component_id': componentId, 'v.rater_id': raterId }).first(voteColumns)) as
    VoteRow | undefined;
  return row ? { id: row.id, vote: toMyVote(row) } : undefined;
}

/** The rater's vote on a component as stored now. */
export async function readRaterVote(
  trx: Knex.Transaction,
  { componentId, raterId }: { componentId: number; raterId: number },
): Promise<MyVote> {
  return toMyVote((await trx('votes as v').where({ 'v.component_id': componentId, 'v.rater_id': raterId }).first(voteColumns)) as VoteRow);
}

/**
 * Writes a vote: updates the stored row (raising its version), or inserts version 1 and marks the
 * assignment started.
 */
export async function writeVote(
  trx: Knex.Transaction,
  {
    existingId,
    componentId,
    runId,
    raterId,
    assignmentId,
    fields,
  }: { existingId: number | null; componentId: number; runId: number; raterId: number; assignmentId: number; fields: VoteFields },
): Promise<void> {
  const row = { label: fields.label, noise_kind: fields.noiseKind, confidence: fields.confidence, note: fields.note };
  if (existingId != null) {
    await trx('votes')
      .where({ id: existingId })
      .update({ ...row, version: trx.raw('version + 1') });
  } else {
    await trx('votes').insert({ component_id: componentId, run_id: runId, rater_id: raterId, ...row, version: 1 });
    await trx('assignments')
      .where({ id: assignmentId })
      .update({ started_at: trx.raw('COALESCE(started_at, CURRENT_TIMESTAMP(3))') });
  }
}
