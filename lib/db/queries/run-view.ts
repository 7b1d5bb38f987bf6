import 'server-only';
import { db } from '@/lib/db/knex';
import type { OtherVote } from '@/lib/desk/types';

/** The study of a ready run, or null (no such run, or not ready yet). */
export async function findReadyRunStudyId({ runId }: { runId: number }): Promise<number | null> {
  const row = await db('runs').where({ id: runId, status: 'ready' }).first('study_id');
  return row ? Number(row.study_id) : null;
}

/**
 * The raters' votes a lead sees in the read-only run view: only votes of raters who have submitted
 * the run (blinding: work in progress stays private), with how many raters are assigned and how
 * many have submitted.
 */
export async function submittedVotesOfRun({ runId, decompositionId }: { runId: number; decompositionId: number }) {
  const assignments = await db('assignments').where({ run_id: runId }).select('rater_id as raterId', 'submitted_at as submittedAt');
  const submitted = assignments.filter((a) => a.submittedAt).map((a) => a.raterId as number);
  const rows: OtherVote[] = submitted.length
    ? await db('votes as v')
        .join('components as c', 'c.id', 'v.component_id')
        .join('users as u', 'u.id', 'v.rater_id')
        .where({ 'v.run_id': runId, 'c.decomposition_id': decompositionId })
        .whereIn('v.rater_id', submitted)
        .orderBy(['c.idx', 'u.name'])
        .select('v.component_id as componentId', 'u.name as raterName', 'v.label', 'v.noise_kind as noiseKind', 'v.confidence', 'v.note')
    : [];
  return {
    assigned: assignments.length,
    submitted: submitted.length,
    votes: rows.map((r) => ({ ...r, confidence: r.confidence == null ? null : Number(r.confidence) })),
  };
}
