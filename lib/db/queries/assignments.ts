import 'server-only';
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { recomputeRunDecisions } from '@/lib/consensus/recompute';
import { db } from '@/lib/db/knex';
import { AppError, notFound } from '@/lib/errors';
import { afterAssignmentsCreated, ensureDailyOverdue } from '@/lib/notifications/enqueue';
import { recordAudit } from './audit';
import { calibrationGate } from './calibration';
import { findStudyAccess } from './study-access';
import { leadsStudy, VOTING_ROLES } from '@/lib/auth/permissions';
import type { UserRow } from './users';

type Caller = Pick<UserRow, 'id' | 'role'>;

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

/** Explains a refusal to a lead: 403 for a member who does not lead the study, 404 for anyone else. */
const notLead = () => new AppError('forbidden', 'Only a lead of this study (or the facility admin) changes its assignments.');

/** The study when the caller leads it (or is an admin); 404 when they may not see it, 403 when they may not change it. */
export async function requireLedStudy({ user, studyId }: { user: Caller; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw notLead();
  return access;
}

/**
 * A run of a study the caller leads (the lead membership is part of the WHERE clause), locked
 * FOR UPDATE inside `trx` so concurrent changes to one run's assignments queue up.
 */
async function lockLedRun(trx: Knex.Transaction, { user, runId }: { user: Caller; runId: number }) {
  const row = await trx('runs as r')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', 'r.study_id').andOn('m.user_id', trx.raw('?', [user.id]));
    })
    .where('r.id', runId)
    .forUpdate()
    .first('r.id', 'r.study_id as studyId', 'r.status', 'r.sub', 'r.ses', 'r.task', 'r.acq', 'r.run_label as runLabel', 'm.study_role as studyRole');
  if (!row || (user.role !== 'admin' && !row.studyRole)) throw notFound('The run');
  if (user.role !== 'admin' && row.studyRole !== 'lead') throw notLead();
  return { id: Number(row.id), studyId: Number(row.studyId), status: String(row.status), name: bidsName({ sub: row.sub, ses: row.ses, task: row.task, acq: row.acq, runLabel: row.runLabel }) };
}

async function pendingCount(trx: Knex | Knex.Transaction, runId: number): Promise<number> {
  const [row] = (await trx.raw(
    `SELECT COUNT(*) AS n FROM components c JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
     LEFT JOIN decisions x ON x.component_id = c.id WHERE d.run_id = ? AND (x.id IS NULL OR x.method = 'pending')`,
    [runId],
  )) as [Array<{ n: number }>];
  return Number(row[0]?.n ?? 0);
}

/** Votes of a rater on the run's current decomposition. */
async function votesOf(trx: Knex.Transaction, { runId, raterId }: { runId: number; raterId: number }): Promise<number> {
  const row = await trx('votes as v')
    .join('components as c', 'c.id', 'v.component_id')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .where({ 'd.run_id': runId, 'd.is_current': true, 'v.rater_id': raterId })
    .count({ n: '*' })
    .first();
  return Number(row?.n ?? 0);
}

/** An active rater member of the study (study role rater), or a 422 naming the problem. */
async function requireStudyRater(trx: Knex.Transaction, { studyId, raterId, field }: { studyId: number; raterId: number; field: string }) {
  const row = await trx('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.study_id': studyId, 'm.user_id': raterId, 'm.study_role': 'rater' })
    .first('u.id', 'u.name', 'u.active', 'u.role');
  if (!row) throw new AppError('validation', 'That person is not a rater of this study. Add them as a rater under Protocol and members first.', { [field]: ['not a rater of this study'] });
  if (!row.active) throw new AppError('validation', `${row.name}'s account is deactivated.`, { [field]: ['deactivated account'] });
  if (!VOTING_ROLES.includes(row.role)) throw new AppError('validation', `${row.name}'s account (${row.role}) may not vote, so it cannot rate runs. Ask the facility admin to change the account's role.`, { [field]: ['account may not vote'] });
  return { id: Number(row.id), name: String(row.name) };
}

/** Runs × assigned raters of a study with each rater's progress, and the study's raters (for choosing). */
export async function listStudyAssignments({ user, studyId }: { user: Caller; studyId: number }): Promise<{ runs: AssignmentRun[]; raters: StudyRater[] }> {
  await requireLedStudy({ user, studyId });
  const runs = await db('runs as r')
    .leftJoin('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', db.raw('1'));
    })
    .where('r.study_id', studyId)
    .select(
      'r.id as runId', 'r.sub', 'r.ses', 'r.task', 'r.acq', 'r.run_label as runLabel', 'r.status', 'd.k',
      db.raw(`(SELECT COUNT(*) FROM components c LEFT JOIN decisions x ON x.component_id = c.id
               WHERE c.decomposition_id = d.id AND (x.id IS NULL OR x.method = 'pending')) as pending`),
    )
    .orderBy([{ column: 'r.sub' }, { column: 'r.ses' }, { column: 'r.task' }, { column: 'r.run_label' }, { column: 'r.id' }]);
  const rows = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('users as u', 'u.id', 'a.rater_id')
    .where('r.study_id', studyId)
    .select(
      'a.run_id as runId', 'a.rater_id as raterId', 'u.name as raterName', 'a.due_at as dueAt', 'a.submitted_at as submittedAt', 'a.notified_at as notifiedAt', 'a.reopen_count as reopenCount',
      db.raw('(a.due_at IS NOT NULL AND a.due_at < NOW(3) AND a.submitted_at IS NULL) as overdue'),
      db.raw(`(SELECT COUNT(*) FROM votes v JOIN components c ON c.id = v.component_id JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
               WHERE d.run_id = a.run_id AND v.rater_id = a.rater_id) as labelled`),
    )
    .orderBy('u.name');
  const byRun = new Map<number, RunAssignment[]>();
  for (const a of rows) {
    const list = byRun.get(Number(a.runId)) ?? [];
    list.push({ raterId: Number(a.raterId), raterName: a.raterName, dueAt: a.dueAt ?? null, labelled: Number(a.labelled), submittedAt: a.submittedAt ?? null, reopenCount: Number(a.reopenCount ?? 0), notifiedAt: a.notifiedAt ?? null, overdue: Boolean(Number(a.overdue)) });
    byRun.set(Number(a.runId), list);
  }
  const certRows = await db('rater_certifications').where({ study_id: studyId }).select('user_id', 'passed');
  const certified = new Map(certRows.map((c: { user_id: number; passed: unknown }) => [Number(c.user_id), Boolean(c.passed)]));
  const raters = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.study_id': studyId, 'm.study_role': 'rater', 'u.active': true })
    .whereIn('u.role', VOTING_ROLES)
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
    raters: raters.map((r) => ({ id: Number(r.id), name: r.name, open: Number(r.open), certified: certRows.length ? (certified.get(Number(r.id)) ?? false) : null })),
  };
}


/** Refuses a live run to a rater under the study's calibration threshold, saying why. */
async function requireCalibrated(trx: Knex.Transaction, { studyId, runId, rater, raterId }: { studyId: number; runId: number; rater: { name: string }; raterId: number }) {
  const r = await trx('runs').where({ id: runId }).first('is_calibration');
  if (r?.is_calibration) return;
  const gate = await calibrationGate({ studyId, raterId }, trx);
  if (!gate.passes) throw new AppError('conflict', `${rater.name} cannot take live runs yet: ${gate.reason} (the study's calibration threshold). Assign them a calibration run, or change the threshold on the calibration page.`);
}

/**
 * Adds a rater to a ready run (optionally with a due date). The run's decisions are recomputed at
 * once, since the number of expected votes grew (a run whose decisions were complete goes back to
 * waiting for the new rater under most rules). Audited; the rater is e-mailed in the next batch.
 */
export async function addRaterToRun({ user, runId, raterId, dueAt, ip }: { user: Caller; runId: number; raterId: number; dueAt?: Date | null; ip?: string | null }) {
  return db.transaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    if (run.status !== 'ready') throw new AppError('conflict', `Run ${run.name} is ${run.status}; raters are assigned once it is ready.`);
    const rater = await requireStudyRater(trx, { studyId: run.studyId, raterId, field: 'raterId' });
    if (await trx('assignments').where({ run_id: runId, rater_id: raterId }).first('id')) {
      throw new AppError('conflict', `${rater.name} is already assigned to ${run.name}.`);
    }
    await requireCalibrated(trx, { studyId: run.studyId, runId, rater, raterId });
    const pendingBefore = await pendingCount(trx, runId);
    await trx('assignments').insert({ run_id: runId, rater_id: raterId, assigned_by: user.id, due_at: dueAt ?? null });
    await recomputeRunDecisions(trx, { runId });
    const pendingAfter = await pendingCount(trx, runId);
    await recordAudit(
      { actorId: user.id, action: 'assignment.add', targetType: 'run', targetId: runId, studyId: run.studyId, detail: { raterId, raterName: rater.name, dueAt: dueAt ?? null, pendingBefore, pendingAfter }, ip },
      trx,
    );
    await afterAssignmentsCreated(trx, { studyId: run.studyId });
    return { runId, raterId, pendingBefore, pendingAfter };
  });
}

/** What removing a rater with votes does, shown with the confirmation and in the refusal. */
export function removalConsequence(name: string, votes: number): string {
  return `${name} has ${votes} vote${votes === 1 ? '' : 's'} on this run. Removing them keeps the votes in the database and in the audit log, but they no longer count for agreement or in the run's expected number of votes; the run's decisions are recomputed.`;
}

async function removeInTrx(trx: Knex.Transaction, { run, raterId, confirm }: { run: { id: number; name: string }; raterId: number; confirm: boolean }) {
  const a = await trx('assignments as a').join('users as u', 'u.id', 'a.rater_id').where({ 'a.run_id': run.id, 'a.rater_id': raterId }).first('a.id', 'u.name', 'a.submitted_at as submittedAt', 'a.due_at as dueAt');
  if (!a) throw notFound('That assignment');
  const votes = await votesOf(trx, { runId: run.id, raterId });
  if (votes > 0 && !confirm) {
    throw new AppError('conflict', `${removalConsequence(a.name, votes)} Confirm to remove them.`, { confirm: ['required: the rater has votes on this run'] });
  }
  await trx('assignments').where({ id: a.id }).del();
  return { name: String(a.name), votes, submittedAt: a.submittedAt ?? null };
}

/**
 * Removes a rater from a run. When they have votes the lead must confirm (409 otherwise); the
 * votes stay in the database but the rater no longer counts. Decisions are recomputed; audited.
 */
export async function removeRaterFromRun({ user, runId, raterId, confirm, ip }: { user: Caller; runId: number; raterId: number; confirm: boolean; ip?: string | null }) {
  return db.transaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    const removed = await removeInTrx(trx, { run, raterId, confirm });
    await recomputeRunDecisions(trx, { runId });
    await recordAudit(
      { actorId: user.id, action: 'assignment.remove', targetType: 'run', targetId: runId, studyId: run.studyId, detail: { raterId, raterName: removed.name, votesKept: removed.votes, submittedAt: removed.submittedAt }, ip },
      trx,
    );
    return { runId, raterId, votesKept: removed.votes };
  });
}

/**
 * Hands a rater's place on a run to another rater of the study (same due date unless a new one
 * is given), in one transaction: confirmation rules as for removal, decisions recomputed, one
 * audit entry, the new rater e-mailed in the next batch.
 */
export async function reassignRun({ user, runId, fromRaterId, toRaterId, dueAt, confirm, ip }: { user: Caller; runId: number; fromRaterId: number; toRaterId: number; dueAt?: Date | null; confirm: boolean; ip?: string | null }) {
  return db.transaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    if (run.status !== 'ready') throw new AppError('conflict', `Run ${run.name} is ${run.status}; raters are assigned once it is ready.`);
    if (fromRaterId === toRaterId) throw new AppError('validation', 'Choose a different rater to take over.', { replaceWith: ['same rater'] });
    const to = await requireStudyRater(trx, { studyId: run.studyId, raterId: toRaterId, field: 'replaceWith' });
    if (await trx('assignments').where({ run_id: runId, rater_id: toRaterId }).first('id')) {
      throw new AppError('conflict', `${to.name} is already assigned to ${run.name}.`);
    }
    await requireCalibrated(trx, { studyId: run.studyId, runId, rater: to, raterId: toRaterId });
    const old = await trx('assignments').where({ run_id: runId, rater_id: fromRaterId }).first('due_at');
    const removed = await removeInTrx(trx, { run, raterId: fromRaterId, confirm });
    const due = dueAt === undefined ? (old?.due_at ?? null) : dueAt;
    await trx('assignments').insert({ run_id: runId, rater_id: toRaterId, assigned_by: user.id, due_at: due });
    await recomputeRunDecisions(trx, { runId });
    await recordAudit(
      { actorId: user.id, action: 'assignment.reassign', targetType: 'run', targetId: runId, studyId: run.studyId, detail: { fromRaterId, fromName: removed.name, toRaterId, toName: to.name, votesKept: removed.votes, dueAt: due }, ip },
      trx,
    );
    await afterAssignmentsCreated(trx, { studyId: run.studyId });
    return { runId, fromRaterId, toRaterId, votesKept: removed.votes };
  });
}

/** Sets (or clears) the due date of one rater's assignment, or of every open assignment of a run. Audited. */
export async function setRunDue({ user, runId, raterId, dueAt, ip }: { user: Caller; runId: number; raterId?: number; dueAt: Date | null; ip?: string | null }) {
  return db.transaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    const q = trx('assignments').where({ run_id: runId });
    if (raterId) q.andWhere({ rater_id: raterId });
    else q.whereNull('submitted_at');
    const changed = await q.update({ due_at: dueAt });
    if (raterId && !changed) throw notFound('That assignment');
    await recordAudit({ actorId: user.id, action: 'assignment.due', targetType: 'run', targetId: runId, studyId: run.studyId, detail: { raterId: raterId ?? null, dueAt, assignments: changed }, ip }, trx);
    if (dueAt) await ensureDailyOverdue(trx);
    return { runId, changed };
  });
}

/**
 * Sets (or clears) the due date of every open (unsubmitted) assignment on many runs of a study the
 * caller leads; runs of other studies are ignored by the WHERE clause (and reported as skipped).
 * One audit entry per run changed.
 */
export async function setStudyDue({ user, studyId, runIds, dueAt, ip }: { user: Caller; studyId: number; runIds: number[]; dueAt: Date | null; ip?: string | null }) {
  await requireLedStudy({ user, studyId });
  return db.transaction(async (trx) => {
    const own = (await trx('runs').where({ study_id: studyId }).whereIn('id', runIds).forUpdate().pluck('id')).map(Number);
    let changed = 0;
    for (const runId of own) {
      const n = await trx('assignments').where({ run_id: runId }).whereNull('submitted_at').update({ due_at: dueAt });
      changed += n;
      if (n) await recordAudit({ actorId: user.id, action: 'assignment.due', targetType: 'run', targetId: runId, studyId, detail: { dueAt, assignments: n, bulk: true }, ip }, trx);
    }
    if (dueAt && changed) await ensureDailyOverdue(trx);
    return { runs: own.length, skipped: runIds.length - own.length, changed };
  });
}

/** A transaction for a use case that reads and writes assignments together (lib/assignments/*). */
export type Trx = Knex.Transaction;
export function inAssignmentsTransaction<T>(fn: (trx: Trx) => Promise<T>): Promise<T> {
  return db.transaction(fn);
}

/** A run's study and name (null when there is no such run). */
export async function findRunStudy({ runId }: { runId: number }): Promise<{ runId: number; studyId: number; name: string } | null> {
  const r = await db('runs').where({ id: runId }).first('id', 'study_id as studyId', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel');
  return r ? { runId: Number(r.id), studyId: Number(r.studyId), name: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }) } : null;
}

/** One rater's assignment on a run with the rater's name, locked FOR UPDATE inside `trx` (null when none). */
export async function lockAssignment(trx: Trx, { runId, raterId }: { runId: number; raterId: number }) {
  const a = await trx('assignments as a')
    .join('users as u', 'u.id', 'a.rater_id')
    .where({ 'a.run_id': runId, 'a.rater_id': raterId })
    .forUpdate()
    .first('a.id', 'u.name as raterName', 'u.email as raterEmail', 'u.active as raterActive', 'a.submitted_at as submittedAt', 'a.first_submitted_at as firstSubmittedAt', 'a.reopen_count as reopenCount');
  return a ? { id: Number(a.id), raterName: String(a.raterName), raterEmail: String(a.raterEmail), raterActive: Boolean(a.raterActive), submittedAt: (a.submittedAt as Date | null) ?? null, firstSubmittedAt: (a.firstSubmittedAt as Date | null) ?? null, reopenCount: Number(a.reopenCount) } : null;
}

/** Reopens a submitted assignment: the rater may change their votes again until they resubmit. */
export async function markAssignmentReopened(trx: Trx, { assignmentId, by, at }: { assignmentId: number; by: number; at: Date }): Promise<void> {
  await trx('assignments')
    .where({ id: assignmentId })
    .update({ submitted_at: null, reopened_at: at, reopened_by: by, reopen_count: trx.raw('reopen_count + 1') });
}
