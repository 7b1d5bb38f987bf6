/**
 * Automatic rater assignment for a run from its study's protocol (raters_per_run), balancing open
 * work: the study's active rater members whose account may vote (VOTING_ROLES) with the fewest open (unsubmitted) assignments in any
 * study come first, ties by user id. When the study certifies raters (rater_certifications has
 * rows for it), raters who passed come before the others, who are used only to fill the protocol's
 * count. Under the study's calibration threshold (lib/calibration/gate.ts) raters who have not
 * reached it are left out altogether. Greedy choice of the least-loaded keeps every rater's open count within one of the others'
 * while nobody submits (tests/integration/assignments-balance.test.ts). Framework-free (takes a connection or a transaction; SQL in lib/db/queries/auto-assignment.ts) so the worker
 * and route handlers share it; a people/notifications module may wrap it (e.g. to send mail for
 * the `created` assignments).
 */
import { VOTING_ROLES } from '@/lib/auth/permissions';
import { calibrationGate, calibrationThreshold } from '@/lib/db/queries/calibration-gate';
import {
  countOpenAssignments,
  countRunAssignments,
  findRunRatersPerRun,
  insertRunAssignments,
  listCertifications,
  lockStudyRaterMembers,
} from '@/lib/db/queries/auto-assignment';
import type { Db } from '@/lib/db/transaction';
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
  db: Db,
  { runId, assignedBy = null }: { runId: number; assignedBy?: number | null },
): Promise<AssignRatersResult> {
  const run = await findRunRatersPerRun(db, { runId });
  if (!run) return { outcome: 'run_not_found', raterIds: [], wanted: 0, short: 0 };
  const wanted = run.ratersPerRun;
  if ((await countRunAssignments(db, { runId })) > 0) return { outcome: 'already_assigned', raterIds: [], wanted, short: 0 };

  // Locking the study's rater memberships serialises concurrent assignment within one study, so
  // two runs finishing together see each other's new assignments when balancing. Only accounts
  // that may vote (VOTING_ROLES) are candidates: nobody gets a run they cannot rate.
  let ids = await lockStudyRaterMembers(db, { studyId: run.studyId, roles: VOTING_ROLES });
  if (ids.length === 0) return { outcome: 'no_raters', raterIds: [], wanted, short: wanted };
  // Under a calibration threshold, raters who have not reached it get no live runs.
  if (isGated(await calibrationThreshold({ studyId: run.studyId }, db))) {
    const passing: number[] = [];
    for (const id of ids) if ((await calibrationGate({ studyId: run.studyId, raterId: id }, db)).passes) passing.push(id);
    ids = passing;
    if (ids.length === 0) return { outcome: 'no_raters', raterIds: [], wanted, short: wanted };
  }
  const openBy = await countOpenAssignments(db, { raterIds: ids });
  const certs = await listCertifications(db, { studyId: run.studyId });
  const certified = new Set(certs.filter((c) => c.passed).map((c) => c.userId));
  const rank = (id: number) => (certs.length === 0 || certified.has(id) ? 0 : 1);
  const chosen = ids
    .map((id) => ({ id, open: openBy.get(id) ?? 0, rank: rank(id) }))
    .sort((a, b) => a.rank - b.rank || a.open - b.open || a.id - b.id)
    .slice(0, wanted)
    .map((r) => r.id);
  await insertRunAssignments(db, { runId, raterIds: chosen, assignedBy });
  return { outcome: 'assigned', raterIds: chosen, wanted, short: Math.max(0, wanted - chosen.length) };
}
