/**
 * Automatic rater assignment for a run from its study's protocol (raters_per_run), balancing open
 * work: the study's active rater members whose account may vote (VOTING_ROLES) with the fewest open (unsubmitted) assignments in any
 * study come first, ties by user id. When the study certifies raters (rater_certifications has
 * rows for it), raters who passed come before the others, who are used only to fill the protocol's
 * count. Under the study's calibration threshold (lib/calibration/gate.ts) raters who have not
 * reached it are left out altogether. Greedy choice of the least-loaded keeps every rater's open count within one of the others'
 * while nobody submits (tests/integration/assignments-balance.test.ts). Framework-free (takes a Knex or a transaction) so the worker
 * and route handlers share it; a people/notifications module may wrap it (e.g. to send mail for
 * the `created` assignments).
 */
import type { Knex } from 'knex';
import { VOTING_ROLES } from '@/lib/auth/permissions';
import { calibrationGate, calibrationThreshold } from '@/lib/db/queries/calibration-gate';
import { isGated } from '@/lib/agreement/threshold-gate';

export interface AssignRatersResult {
  /** 'assigned', or why nothing was done. */
  outcome: 'assigned' | 'already_assigned' | 'no_raters' | 'run_not_found';
  /** Rater user ids given an assignment now, in the order chosen. */
  raterIds: number[];
  /** raters_per_run of the study. */
  wanted: number;
  /** How many more raters the protocol asks for than the study has (0 when enough). */
  short: number;
}

export async function assignRaters(
  db: Knex,
  { runId, assignedBy = null }: { runId: number; assignedBy?: number | null },
): Promise<AssignRatersResult> {
  const run = await db('runs as r')
    .join('studies as s', 's.id', 'r.study_id')
    .select('r.id', 'r.study_id', 's.raters_per_run')
    .where('r.id', runId)
    .first();
  if (!run) return { outcome: 'run_not_found', raterIds: [], wanted: 0, short: 0 };
  const wanted = Number(run.raters_per_run);
  const existing = await db('assignments').where({ run_id: runId }).count({ n: '*' }).first();
  if (Number(existing?.n ?? 0) > 0) return { outcome: 'already_assigned', raterIds: [], wanted, short: 0 };

  // Locking the study's rater memberships serialises concurrent assignment within one study, so
  // two runs finishing together see each other's new assignments when balancing.
  const members = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .select('m.user_id')
    .where({ 'm.study_id': run.study_id, 'm.study_role': 'rater', 'u.active': true })
    .whereIn('u.role', VOTING_ROLES) // an account that may not vote never gets a run it cannot rate
    .orderBy('m.user_id')
    .forUpdate();
  if (members.length === 0) return { outcome: 'no_raters', raterIds: [], wanted, short: wanted };
  let ids = members.map((m: { user_id: number }) => Number(m.user_id));
  // Under a calibration threshold, raters who have not reached it get no live runs.
  if (isGated(await calibrationThreshold({ studyId: Number(run.study_id) }, db))) {
    const passing: number[] = [];
    for (const id of ids) if ((await calibrationGate({ studyId: Number(run.study_id), raterId: id }, db)).passes) passing.push(id);
    ids = passing;
    if (ids.length === 0) return { outcome: 'no_raters', raterIds: [], wanted, short: wanted };
  }
  const open = await db('assignments')
    .select('rater_id')
    .count({ n: '*' })
    .whereIn('rater_id', ids)
    .whereNull('submitted_at')
    .groupBy('rater_id');
  const openBy = new Map<number, number>(
    (open as Array<{ rater_id: number; n: number | string }>).map((o) => [Number(o.rater_id), Number(o.n)]),
  );
  const certs = (await db('rater_certifications').where({ study_id: run.study_id }).select('user_id', 'passed')) as Array<{
    user_id: number;
    passed: number | boolean;
  }>;
  const certified = new Set(certs.filter((c) => Boolean(c.passed)).map((c) => Number(c.user_id)));
  const rank = (id: number) => (certs.length === 0 || certified.has(id) ? 0 : 1);
  const chosen = ids
    .map((id) => ({ id, open: openBy.get(id) ?? 0, rank: rank(id) }))
    .sort((a, b) => a.rank - b.rank || a.open - b.open || a.id - b.id)
    .slice(0, wanted)
    .map((r) => r.id);
  await db('assignments').insert(chosen.map((raterId) => ({ run_id: runId, rater_id: raterId, assigned_by: assignedBy })));
  return { outcome: 'assigned', raterIds: chosen, wanted, short: Math.max(0, wanted - chosen.length) };
}
