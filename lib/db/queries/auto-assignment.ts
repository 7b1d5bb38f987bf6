// The SQL of automatic rater assignment (lib/runs/assign-raters.ts). No `server-only`: the decompose
// job assigns raters in the worker.
import type { Knex } from 'knex';

/** The run's study and the protocol's raters per run (null: no such run). */
export async function findRunRatersPerRun(
  db: Knex,
  { runId }: { runId: number },
): Promise<{ studyId: number; ratersPerRun: number } | null> {
  const run = await db('runs as r')
    .join('studies as s', 's.id', 'r.study_id')
    .select('r.id', 'r.study_id', 's.raters_per_run')
    .where('r.id', runId)
    .first();
  return run ? { studyId: Number(run.study_id), ratersPerRun: Number(run.raters_per_run) } : null;
}

/** How many assignments the run has. */
export async function countRunAssignments(db: Knex, { runId }: { runId: number }): Promise<number> {
  const existing = await db('assignments').where({ run_id: runId }).count({ n: '*' }).first();
  return Number(existing?.n ?? 0);
}

/**
 * The study's rater members whose account is active and has one of `roles`, by user id, their
 * membership rows locked FOR UPDATE (concurrent assignment within one study takes turns).
 */
export async function lockStudyRaterMembers(
  db: Knex,
  { studyId, roles }: { studyId: number; roles: readonly string[] },
): Promise<number[]> {
  const members = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .select('m.user_id')
    .where({ 'm.study_id': studyId, 'm.study_role': 'rater', 'u.active': true })
    .whereIn('u.role', roles)
    .orderBy('m.user_id')
    .forUpdate();
  return members.map((m: { user_id: number }) => Number(m.user_id));
}

/** Open (unsubmitted) assignments in any study per rater; raters with none are absent. */
export async function countOpenAssignments(db: Knex, { raterIds }: { raterIds: number[] }): Promise<Map<number, number>> {
  const open = await db('assignments')
    .select('rater_id')
    .count({ n: '*' })
    .whereIn('rater_id', raterIds)
    .whereNull('submitted_at')
    .groupBy('rater_id');
  return new Map<number, number>((open as Array<{ rater_id: number; n: number | string }>).map((o) => [Number(o.rater_id), Number(o.n)]));
}

/** The study's rater certifications (passed or not). */
export async function listCertifications(db: Knex, { studyId }: { studyId: number }): Promise<Array<{ userId: number; passed: boolean }>> {
  const certs = (await db('rater_certifications').where({ study_id: studyId }).select('user_id', 'passed')) as Array<{
    user_id: number;
    passed: number | boolean;
  }>;
  return certs.map((c) => ({ userId: Number(c.user_id), passed: Boolean(c.passed) }));
}

/** One assignment of the run per rater. */
export async function insertRunAssignments(
  db: Knex,
  { runId, raterIds, assignedBy }: { runId: number; raterIds: number[]; assignedBy: number | null },
): Promise<void> {
  await db('assignments').insert(raterIds.map((raterId) => ({ run_id: runId, rater_id: raterId, assigned_by: assignedBy })));
}
