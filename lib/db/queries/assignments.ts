import 'server-only';
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { db } from '@/lib/db/knex';
import type { Role, StudyRole } from '@/lib/vocabulary/roles';

export type RunAssignment = {
  raterId: number;
  raterName: string;
  dueAt: Date | null;
  labelled: number;
  submittedAt: Date | null;
  /** Times a lead reopened this rater's submission. */
  reopenCount: number;
  notifiedAt: Date | null;
  overdue: boolean;
};

export type AssignmentRun = {
  runId: number;
  runName: string;
  status: string;
  /** Components of the current decomposition (0 before the run is ready). */
  total: number;
  /** Components whose decision waits (pending or none yet). */
  pending: number;
  assignments: RunAssignment[];
};

export type StudyRater = { id: number; name: string; open: number; certified: boolean | null };

/**
 * A run with the caller's study role on its study (the membership is part of the WHERE clause),
 * locked FOR UPDATE inside `trx` so concurrent changes to one run's assignments queue up; null when
 * there is no such run.
 */
export async function lockRunWithStudyRole(trx: Knex.Transaction, { userId, runId }: { userId: number; runId: number }) {
  const row = await trx('runs as r')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', 'r.study_id').andOn('m.user_id', trx.raw('?', [userId]));
    })
    .where('r.id', runId)
    .forUpdate()
    .first(
      'r.id',
      'r.study_id as studyId',
      'r.status',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'm.study_role as studyRole',
    );
  if (!row) return null;
  return {
    id: Number(row.id),
    studyId: Number(row.studyId),
    status: String(row.status),
    name: bidsName({ sub: row.sub, ses: row.ses, task: row.task, acq: row.acq, runLabel: row.runLabel }),
    studyRole: (row.studyRole as StudyRole | null) ?? null,
  };
}

/** Components of the run's current decomposition whose decision waits (pending or none yet). */
export async function countPendingDecisions(trx: Knex | Knex.Transaction, runId: number): Promise<number> {
  const [row] = (await trx.raw(
    `SELECT COUNT(*) AS n FROM components c JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
     LEFT JOIN decisions x ON x.component_id = c.id WHERE d.run_id = ? AND (x.id IS NULL OR x.method = 'pending')`,
    [runId],
  )) as [Array<{ n: number }>];
  return Number(row[0]?.n ?? 0);
}

/** Votes of a rater on the run's current decomposition. */
export async function countRaterVotes(trx: Knex.Transaction, { runId, raterId }: { runId: number; raterId: number }): Promise<number> {
  const row = await trx('votes as v')
    .join('components as c', 'c.id', 'v.component_id')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .where({ 'd.run_id': runId, 'd.is_current': true, 'v.rater_id': raterId })
    .count({ n: '*' })
    .first();
  return Number(row?.n ?? 0);
}

/** A rater member of the study (study role rater) with their account's name, active flag and role; undefined when not one. */
export async function findStudyRaterMember(
  trx: Knex.Transaction,
  { studyId, raterId }: { studyId: number; raterId: number },
): Promise<{ id: number; name: string; active: boolean; role: Role } | undefined> {
  return trx('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.study_id': studyId, 'm.user_id': raterId, 'm.study_role': 'rater' })
    .first('u.id', 'u.name', 'u.active', 'u.role');
}

/** Runs × assigned raters of a study with each rater's progress, and the study's raters (for choosing). No access check: callers scope. */
export async function listAssignmentsOfStudy({
  studyId,
  votingRoles,
}: {
  studyId: number;
  /** Account roles that may vote (the permission matrix's VOTING_ROLES): only they are offered as raters. */
  votingRoles: readonly string[];
}): Promise<{ runs: AssignmentRun[]; raters: StudyRater[] }> {
  const runs = await db('runs as r')
    .leftJoin('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', db.raw('1'));
    })
    .where('r.study_id', studyId)
    .select(
      'r.id as runId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'r.status',
      'd.k',
      db.raw(`(SELECT COUNT(*) FROM components c LEFT JOIN decisions x ON x.component_id = c.id
               WHERE c.decomposition_id = d.id AND (x.id IS NULL OR x.method = 'pending')) as pending`),
    )
    .orderBy([{ column: 'r.sub' }, { column: 'r.ses' }, { column: 'r.task' }, { column: 'r.run_label' }, { column: 'r.id' }]);
  const rows = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('users as u', 'u.id', 'a.rater_id')
    .where('r.study_id', studyId)
    .select(
      'a.run_id as runId',
      'a.rater_id as raterId',
      'u.name as raterName',
      'a.due_at as dueAt',
      'a.submitted_at as submittedAt',
      'a.notified_at as notifiedAt',
      'a.reopen_count as reopenCount',
      db.raw('(a.due_at IS NOT NULL AND a.due_at < NOW(3) AND a.submitted_at IS NULL) as overdue'),
      db.raw(`(SELECT COUNT(*) FROM votes v JOIN components c ON c.id = v.component_id JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
               WHERE d.run_id = a.run_id AND v.rater_id = a.rater_id) as labelled`),
    )
    .orderBy('u.name');
  const byRun = new Map<number, RunAssignment[]>();
  for (const a of rows) {
    const list = byRun.get(Number(a.runId)) ?? [];
    list.push({
      raterId: Number(a.raterId),
      raterName: a.raterName,
      dueAt: a.dueAt ?? null,
      labelled: Number(a.labelled),
      submittedAt: a.submittedAt ?? null,
      reopenCount: Number(a.reopenCount ?? 0),
      notifiedAt: a.notifiedAt ?? null,
      overdue: Boolean(Number(a.overdue)),
    });
    byRun.set(Number(a.runId), list);
  }
  const certRows = await db('rater_certifications').where({ study_id: studyId }).select('user_id', 'passed');
  const certified = new Map(certRows.map((c: { user_id: number; passed: unknown }) => [Number(c.user_id), Boolean(c.passed)]));
  const raters = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.study_id': studyId, 'm.study_role': 'rater', 'u.active': true })
    .whereIn('u.role', votingRoles)
    .select('u.id', 'u.name', db.raw('(SELECT COUNT(*) FROM assignments a WHERE a.rater_id = u.id AND a.submitted_at IS NULL) as open'))
    .orderBy('u.name');
  return {
    runs: runs.map((r) => ({
      runId: Number(r.runId),
      runName: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }),
      status: r.status,
      total: Number(r.k ?? 0),
      pending: Number(r.pending ?? 0),
      assignments: byRun.get(Number(r.runId)) ?? [],
    })),
    raters: raters.map((r) => ({
      id: Number(r.id),
      name: r.name,
      open: Number(r.open),
      certified: certRows.length ? (certified.get(Number(r.id)) ?? false) : null,
    })),
  };
}

/** Whether the run is a calibration run. */
export async function isCalibrationRun(trx: Knex.Transaction, { runId }: { runId: number }): Promise<boolean> {
  const r = await trx('runs').where({ id: runId }).first('is_calibration');
  return Boolean(r?.is_calibration);
}

/** Whether the rater is assigned to the run. */
export async function isAssigned(trx: Knex.Transaction, { runId, raterId }: { runId: number; raterId: number }): Promise<boolean> {
  return Boolean(await trx('assignments').where({ run_id: runId, rater_id: raterId }).first('id'));
}

export async function insertAssignment(
  trx: Knex.Transaction,
  { runId, raterId, assignedBy, dueAt }: { runId: number; raterId: number; assignedBy: number; dueAt: Date | null },
): Promise<void> {
  await trx('assignments').insert({ run_id: runId, rater_id: raterId, assigned_by: assignedBy, due_at: dueAt });
}

/** One rater's assignment on a run with the rater's name and due date (undefined when none). */
export async function findAssignmentOfRater(
  trx: Knex.Transaction,
  { runId, raterId }: { runId: number; raterId: number },
): Promise<{ id: number; name: string; submittedAt: Date | null; dueAt: Date | null } | undefined> {
  return trx('assignments as a')
    .join('users as u', 'u.id', 'a.rater_id')
    .where({ 'a.run_id': runId, 'a.rater_id': raterId })
    .first('a.id', 'u.name', 'a.submitted_at as submittedAt', 'a.due_at as dueAt');
}

export async function deleteAssignment(trx: Knex.Transaction, { assignmentId }: { assignmentId: number }): Promise<void> {
  await trx('assignments').where({ id: assignmentId }).del();
}

/** Sets the due date of one rater's assignment on a run, or of every open one; returns how many changed. */
export async function updateRunDue(
  trx: Knex.Transaction,
  { runId, raterId, dueAt }: { runId: number; raterId?: number; dueAt: Date | null },
): Promise<number> {
  const q = trx('assignments').where({ run_id: runId });
  if (raterId) q.andWhere({ rater_id: raterId });
  else q.whereNull('submitted_at');
  return q.update({ due_at: dueAt });
}

/** Of the given runs, the ids of those in the study, their rows locked. */
export async function lockStudyRuns(trx: Knex.Transaction, { studyId, runIds }: { studyId: number; runIds: number[] }): Promise<number[]> {
  return (await trx('runs').where({ study_id: studyId }).whereIn('id', runIds).forUpdate().pluck('id')).map(Number);
}

/** Sets the due date of a run's open (unsubmitted) assignments; returns how many changed. */
export async function updateOpenDue(trx: Knex.Transaction, { runId, dueAt }: { runId: number; dueAt: Date | null }): Promise<number> {
  return trx('assignments').where({ run_id: runId }).whereNull('submitted_at').update({ due_at: dueAt });
}

/** A run's study and name (null when there is no such run). */
export async function findRunStudy({ runId }: { runId: number }): Promise<{ runId: number; studyId: number; name: string } | null> {
  const r = await db('runs').where({ id: runId }).first('id', 'study_id as studyId', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel');
  return r
    ? {
        runId: Number(r.id),
        studyId: Number(r.studyId),
        name: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }),
      }
    : null;
}

/** One rater's assignment on a run with the rater's name, locked FOR UPDATE inside `trx` (null when none). */
export async function lockAssignment(trx: Knex.Transaction, { runId, raterId }: { runId: number; raterId: number }) {
  const a = await trx('assignments as a')
    .join('users as u', 'u.id', 'a.rater_id')
    .where({ 'a.run_id': runId, 'a.rater_id': raterId })
    .forUpdate()
    .first(
      'a.id',
      'u.name as raterName',
      'u.email as raterEmail',
      'u.active as raterActive',
      'a.submitted_at as submittedAt',
      'a.first_submitted_at as firstSubmittedAt',
      'a.reopen_count as reopenCount',
    );
  return a
    ? {
        id: Number(a.id),
        raterName: String(a.raterName),
        raterEmail: String(a.raterEmail),
        raterActive: Boolean(a.raterActive),
        submittedAt: (a.submittedAt as Date | null) ?? null,
        firstSubmittedAt: (a.firstSubmittedAt as Date | null) ?? null,
        reopenCount: Number(a.reopenCount),
      }
    : null;
}

/** Reopens a submitted assignment: the rater may change their votes again until they resubmit. */
export async function markAssignmentReopened(
  trx: Knex.Transaction,
  { assignmentId, by, at }: { assignmentId: number; by: number; at: Date },
): Promise<void> {
  await trx('assignments')
    .where({ id: assignmentId })
    .update({ submitted_at: null, reopened_at: at, reopened_by: by, reopen_count: trx.raw('reopen_count + 1') });
}
