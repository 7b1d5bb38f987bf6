import 'server-only';
import { db } from '@/lib/db/knex';
import type { OtherVote } from '@/lib/desk/types';
import type { UserRow } from './users';
import { findStudyAccess } from './study-access';
import { loadRunShapes } from './reconcile-run';

type Viewer = Pick<UserRow, 'id' | 'role'>;

/** Who opens a run read-only: the study's leads and observers, and facility admins. */
export type RunViewRole = 'lead' | 'observer';

/**
 * A run's current decomposition for the read-only run view: the same shapes the rating desk draws,
 * reached through the study (lead, observer or admin) instead of an assignment. Null when the
 * caller may not see the run or it has no decomposition (callers answer 404 either way).
 */
export async function loadRunForViewing({ user, runId }: { user: Viewer; runId: number }) {
  const studyId = (await db('runs').where({ id: runId, status: 'ready' }).first('study_id'))?.study_id as number | undefined;
  const access = studyId ? await findStudyAccess({ user, studyId }) : null;
  const role: RunViewRole | null = !access
    ? null
    : access.isAdmin || access.studyRole === 'lead'
      ? 'lead'
      : access.studyRole === 'observer'
        ? 'observer'
        : null;
  if (!role) return null;
  const shapes = await loadRunShapes({ runId });
  return shapes ? { ...shapes, role } : null;
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
