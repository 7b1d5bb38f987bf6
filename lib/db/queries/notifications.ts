// The `notifications` rows (which e-mail was sent to whom, once) and the recipients the notice
// jobs mail (lib/notifications/*). No `server-only`: the worker sends the notices.
import type { Knex } from 'knex';
import { parseJson, toJson } from '@/lib/db/knex';

/** The active leads of the studies. */
export async function listActiveLeads(
  db: Knex,
  { studyIds }: { studyIds: number[] },
): Promise<Array<{ studyId: number; id: number; email: string; name: string }>> {
  return db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .whereIn('m.study_id', studyIds)
    .where({ 'm.study_role': 'lead', 'u.active': true })
    .select('m.study_id as studyId', 'u.id', 'u.email', 'u.name');
}

/** "userId|key" of the notifications of a kind sent to the users in the last `days` days. */
export async function recentNotificationKeys(
  db: Knex,
  { kind, userIds, days }: { kind: string; userIds: number[]; days: number },
): Promise<Set<string>> {
  const done = await db('notifications')
    .where({ kind })
    .whereIn('user_id', userIds.concat(0))
    .where('created_at', '>=', db.raw('NOW(3) - INTERVAL ? DAY', [days]))
    .select('user_id', 'payload');
  return new Set(done.map((d) => `${d.user_id}|${parseJson<{ key?: string }>(d.payload, {})?.key ?? ''}`));
}

export async function insertNotification(
  db: Knex,
  { userId, kind, payload }: { userId: number; kind: string; payload: unknown },
): Promise<void> {
  await db('notifications').insert({ user_id: userId, kind, payload: toJson(payload) });
}

/** The stored payloads of the notifications of a kind sent to the users, whenever sent. */
export async function listNotificationPayloads(
  db: Knex,
  { kind, userIds }: { kind: string; userIds: number[] },
): Promise<Array<{ user_id: number; payload: unknown }>> {
  return db('notifications').where({ kind }).whereIn('user_id', userIds.concat(0)).select('user_id', 'payload');
}

/** Passed certifications of active raters in studies with a calibration threshold column set. */
export async function listCertifiedInThresholdStudies(
  db: Knex,
): Promise<Array<{ studyId: number; raterId: number; raterName: string; studyName: string }>> {
  return db('rater_certifications as rc')
    .join('users as u', 'u.id', 'rc.user_id')
    .join('studies as s', 's.id', 'rc.study_id')
    .where({ 'rc.passed': true, 'u.active': true })
    .where((q) => q.whereNotNull('s.calibration_min_ac1').orWhereNotNull('s.calibration_min_sensitivity'))
    .select('rc.study_id as studyId', 'rc.user_id as raterId', 'u.name as raterName', 's.name as studyName');
}

/** When the rater last submitted a calibration run of the study (null: never). */
export async function lastCalibrationSubmission(
  db: Knex,
  { studyId, raterId }: { studyId: number; raterId: number },
): Promise<Date | null> {
  const last = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .where({ 'a.rater_id': raterId, 'r.study_id': studyId, 'r.is_calibration': true })
    .whereNotNull('a.submitted_at')
    .max({ at: 'a.submitted_at' })
    .first();
  return last?.at ? new Date(last.at) : null;
}

/** Raters with unnotified, unsubmitted assignments on ready runs whose account is active, by id. */
export async function listRatersToNotify(db: Knex): Promise<number[]> {
  const raters = (await db('assignments as a')
    .join('users as u', 'u.id', 'a.rater_id')
    .join('runs as r', 'r.id', 'a.run_id')
    .whereNull('a.notified_at')
    .whereNull('a.submitted_at')
    .where({ 'u.active': true, 'r.status': 'ready' })
    .distinct('a.rater_id')
    .orderBy('a.rater_id')) as Array<{ rater_id: number }>;
  return raters.map((r) => Number(r.rater_id));
}

/**
 * Locks FOR UPDATE only the rater's unnotified, unsubmitted assignments on ready runs (the runs
 * subquery is not locked); returns their ids.
 */
export async function lockUnnotifiedAssignments(trx: Knex.Transaction, { raterId }: { raterId: number }): Promise<number[]> {
  return (await trx('assignments')
    .where({ rater_id: raterId })
    .whereNull('notified_at')
    .whereNull('submitted_at')
    .whereIn('run_id', trx('runs').select('id').where({ status: 'ready' }))
    .forUpdate()
    .pluck('id')) as number[];
}

export type NoticeAssignment = {
  id: number;
  runId: number;
  dueAt: Date | null;
  studyName: string;
  sub: string;
  ses: string | null;
  task: string | null;
  acq: string | null;
  runLabel: string | null;
};

/** The assignments with their run's entities and study name, by study name then run. */
export async function listNoticeAssignments(
  trx: Knex.Transaction,
  { assignmentIds }: { assignmentIds: number[] },
): Promise<NoticeAssignment[]> {
  return trx('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .whereIn('a.id', assignmentIds)
    .orderBy([{ column: 's.name' }, { column: 'r.id' }])
    .select(
      'a.id',
      'a.run_id as runId',
      'a.due_at as dueAt',
      's.name as studyName',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
    );
}

/** The account's e-mail address and name (undefined: no such account). */
export async function findUserContact(db: Knex, { userId }: { userId: number }): Promise<{ email: string; name: string } | undefined> {
  return db('users').where({ id: userId }).first('email', 'name');
}

/** notified_at = now on the assignments. */
export async function markAssignmentsNotified(trx: Knex.Transaction, { assignmentIds }: { assignmentIds: number[] }): Promise<void> {
  await trx('assignments')
    .whereIn('id', assignmentIds)
    .update({ notified_at: trx.fn.now(3) });
}
