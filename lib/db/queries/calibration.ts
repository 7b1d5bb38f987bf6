import 'server-only';
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { scoreAgainstReference, type CalibrationScore } from '@/lib/agreement/reference-score';
import { db, parseJson, toJson } from '@/lib/db/knex';
import { studyLabels } from './calibration-gate';

// Rows of a study's calibration set (SQL only). What a lead may do with them, and the refusals,
// are the use cases in lib/calibration/<verb-noun>.ts.

const nameOf = (r: { sub: string; ses: string | null; task: string | null; acq: string | null; runLabel: string | null }) =>
  bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel });

/** The study's label set and noise kinds (the keys a reference label may take). */
export function calibrationLabels({ studyId }: { studyId: number }, trx: Knex | Knex.Transaction = db) {
  return studyLabels(trx, studyId);
}

/** A run of this study (study id in the WHERE clause), locked for the change; null when the study has no such run. */
export async function lockStudyRun(trx: Knex.Transaction, { studyId, runId }: { studyId: number; runId: number }) {
  const row = await trx('runs')
    .where({ id: runId, study_id: studyId })
    .forUpdate()
    .first('id', 'status', 'is_calibration as isCalibration', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel');
  if (!row) return null;
  return { id: Number(row.id), status: String(row.status), isCalibration: Boolean(row.isCalibration), name: nameOf(row) };
}

/** Marks (or unmarks) a run of the study as a calibration run. */
export async function setCalibrationFlag(
  { studyId, runId, isCalibration }: { studyId: number; runId: number; isCalibration: boolean },
  trx: Knex | Knex.Transaction = db,
): Promise<void> {
  await trx('runs').where({ id: runId, study_id: studyId }).update({ is_calibration: isCalibration });
}

export type CalibrationComponent = {
  id: number;
  idx: number;
  decisionLabel: string | null;
  decisionKind: string | null;
  method: string | null;
  referenceLabel: string | null;
};

/** Components of the run's current decomposition with their decision and reference label. */
export async function runComponents(trx: Knex | Knex.Transaction, runId: number): Promise<CalibrationComponent[]> {
  return (await trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .leftJoin('decisions as x', 'x.component_id', 'c.id')
    .leftJoin('reference_labels as rl', 'rl.component_id', 'c.id')
    .where({ 'd.run_id': runId, 'd.is_current': true })
    .orderBy('c.idx')
    .select(
      'c.id',
      'c.idx',
      'x.label as decisionLabel',
      'x.noise_kind as decisionKind',
      'x.method',
      'rl.label as referenceLabel',
    )) as CalibrationComponent[];
}

/** Writes reference labels (replacing a component's earlier one). */
export async function upsertReferenceLabels(
  trx: Knex.Transaction,
  rows: Array<{ componentId: number; label: string; noiseKind: string | null; setBy: number }>,
): Promise<void> {
  await trx('reference_labels')
    .insert(rows.map((r) => ({ component_id: r.componentId, label: r.label, noise_kind: r.noiseKind, set_by: r.setBy })))
    .onConflict('component_id')
    .merge(['label', 'noise_kind', 'set_by']);
}

/** The study's calibration runs with component, reference and pending-decision counts. */
export async function listCalibrationRuns({ studyId }: { studyId: number }) {
  const rows = await db('runs as r')
    .leftJoin('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', db.raw('1'));
    })
    .where({ 'r.study_id': studyId, 'r.is_calibration': true })
    .orderBy('r.id')
    .select(
      'r.id as runId',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'r.status',
      db.raw('(SELECT COUNT(*) FROM components c WHERE c.decomposition_id = d.id) as total'),
      db.raw(
        '(SELECT COUNT(*) FROM components c JOIN reference_labels rl ON rl.component_id = c.id WHERE c.decomposition_id = d.id) as referenced',
      ),
      db.raw(`(SELECT COUNT(*) FROM components c LEFT JOIN decisions x ON x.component_id = c.id
               WHERE c.decomposition_id = d.id AND (x.id IS NULL OR x.method = 'pending' OR x.label IS NULL)) as pending`),
    );
  return rows.map((r) => ({
    runId: Number(r.runId),
    runName: nameOf(r),
    status: String(r.status),
    total: Number(r.total ?? 0),
    referenced: Number(r.referenced ?? 0),
    pending: Number(r.pending ?? 0),
  }));
}

/** The assignments on the study's calibration runs, with how many components each rater labelled. */
export async function listCalibrationAssignments({ studyId }: { studyId: number }) {
  const rows = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('users as u', 'u.id', 'a.rater_id')
    .where({ 'r.study_id': studyId, 'r.is_calibration': true })
    .orderBy('u.name')
    .select(
      'a.run_id as runId',
      'a.rater_id as raterId',
      'u.name as raterName',
      'a.submitted_at as submittedAt',
      db.raw(`(SELECT COUNT(*) FROM votes v JOIN components c ON c.id = v.component_id JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
               WHERE d.run_id = a.run_id AND v.rater_id = a.rater_id) as labelled`),
    );
  return rows.map((a) => ({
    runId: Number(a.runId),
    raterId: Number(a.raterId),
    raterName: String(a.raterName),
    labelled: Number(a.labelled ?? 0),
    submittedAt: (a.submittedAt ?? null) as Date | null,
  }));
}

/** Ready runs of the study that are not calibration runs (those that could become one). */
export async function listCalibrationCandidates({ studyId }: { studyId: number }) {
  return (
    await db('runs')
      .where({ study_id: studyId, is_calibration: false, status: 'ready' })
      .orderBy('id')
      .select('id as runId', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel')
  ).map((r) => ({ runId: Number(r.runId), runName: nameOf(r) }));
}

export type CertificationRecord = {
  passed: boolean;
  certifiedBy: number | null;
  certifiedAt: Date | null;
  scores: CalibrationScore | null;
};

/** The raters of the study (study role rater) with their certification record, by name. */
export async function listStudyRatersWithCertification({ studyId }: { studyId: number }) {
  const rows = await db('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .leftJoin('rater_certifications as rc', function () {
      this.on('rc.study_id', 'm.study_id').andOn('rc.user_id', 'm.user_id');
    })
    .where({ 'm.study_id': studyId, 'm.study_role': 'rater' })
    .orderBy('u.name')
    .select(
      'u.id',
      'u.name',
      'u.active',
      'rc.id as certId',
      'rc.passed',
      'rc.certified_by as certifiedBy',
      'rc.certified_at as certifiedAt',
      'rc.scores',
    );
  return rows.map((m) => ({
    id: Number(m.id),
    name: String(m.name),
    active: Boolean(m.active),
    certification: m.certId
      ? ({
          passed: Boolean(m.passed),
          certifiedBy: m.certifiedBy == null ? null : Number(m.certifiedBy),
          certifiedAt: m.certifiedAt ?? null,
          scores: parseJson<CalibrationScore>(m.scores, null),
        } satisfies CertificationRecord)
      : null,
  }));
}

/** A rater (study role rater) of the study with their account's name and state, or null; locked when forUpdate. */
export async function findStudyRater(
  trx: Knex | Knex.Transaction,
  { studyId, userId, forUpdate = false }: { studyId: number; userId: number; forUpdate?: boolean },
): Promise<{ id: number; name: string; active: boolean } | null> {
  const q = trx('study_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.study_id': studyId, 'm.user_id': userId, 'm.study_role': 'rater' });
  if (forUpdate) q.forUpdate();
  const row = await q.first('u.id', 'u.name', 'u.active');
  return row ? { id: Number(row.id), name: String(row.name), active: Boolean(row.active) } : null;
}

/** Stores a lead's verdict on a rater (replacing an earlier one). */
export async function upsertCertification(
  trx: Knex.Transaction,
  c: { studyId: number; userId: number; scores: CalibrationScore; passed: boolean; certifiedBy: number; certifiedAt: Date },
): Promise<void> {
  await trx('rater_certifications')
    .insert({
      study_id: c.studyId,
      user_id: c.userId,
      scores: toJson(c.scores),
      passed: c.passed,
      certified_by: c.certifiedBy,
      certified_at: c.certifiedAt,
    })
    .onConflict(['study_id', 'user_id'])
    .merge(['scores', 'passed', 'certified_by', 'certified_at']);
}

/** A rater's certification in a study (passed and when), or null. */
export async function findCertification({ studyId, userId }: { studyId: number; userId: number }) {
  const cert = await db('rater_certifications')
    .where({ study_id: studyId, user_id: userId })
    .first('passed', 'certified_at as certifiedAt');
  return cert ? { passed: Boolean(cert.passed), certifiedAt: (cert.certifiedAt ?? null) as Date | null } : null;
}

/** A run of the study with its calibration flag and the raters assigned to it (null when not in the study). */
export async function calibrationRunInfo({ studyId, runId }: { studyId: number; runId: number }) {
  const r = await db('runs')
    .where({ id: runId, study_id: studyId })
    .first('id', 'is_calibration as isCalibration', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel');
  if (!r) return null;
  const raters = (await db('assignments').where({ run_id: runId }).select('rater_id')).map((a: { rater_id: number }) => Number(a.rater_id));
  return { runId: Number(r.id), isCalibration: Boolean(r.isCalibration), name: nameOf(r), raterIds: raters };
}

export type CalibrationResultRow = {
  componentId: number;
  idx: number;
  myLabel: string | null;
  myKind: string | null;
  referenceLabel: string | null;
  referenceKind: string | null;
  reason: string | null;
  features: Record<string, number | null>;
};

/**
 * A rater's result on one calibration run they have submitted, component by component: their
 * label, the reference label and the lead's reason (the reason of the decision the reference was
 * adopted from). null when the run is not a calibration run of the study assigned to the rater and
 * submitted (the reference stays hidden until the rater has submitted).
 */
export async function calibrationResult({ studyId, runId, raterId }: { studyId: number; runId: number; raterId: number }) {
  const run = await db('runs as r')
    .join('assignments as a', function () {
      this.on('a.run_id', 'r.id').andOn('a.rater_id', db.raw('?', [raterId]));
    })
    .where({ 'r.id': runId, 'r.study_id': studyId, 'r.is_calibration': true })
    .whereNotNull('a.submitted_at')
    .first('r.id', 'r.sub', 'r.ses', 'r.task', 'r.acq', 'r.run_label as runLabel', 'a.submitted_at as submittedAt');
  if (!run) return null;
  const rows = await db('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .leftJoin('votes as v', function () {
      this.on('v.component_id', 'c.id').andOn('v.rater_id', db.raw('?', [raterId]));
    })
    .leftJoin('reference_labels as rl', 'rl.component_id', 'c.id')
    .leftJoin('decisions as x', 'x.component_id', 'c.id')
    .where({ 'd.run_id': runId, 'd.is_current': true })
    .orderBy('c.idx')
    .select(
      'c.id',
      'c.idx',
      'c.features',
      'v.label as myLabel',
      'v.noise_kind as myKind',
      'rl.label as referenceLabel',
      'rl.noise_kind as referenceKind',
      'x.reason',
    );
  return {
    runId,
    runName: nameOf(run),
    submittedAt: new Date(run.submittedAt).toISOString(),
    components: rows.map((r): CalibrationResultRow => ({
      componentId: Number(r.id),
      idx: Number(r.idx),
      myLabel: r.myLabel ?? null,
      myKind: r.myKind ?? null,
      referenceLabel: r.referenceLabel ?? null,
      referenceKind: r.referenceKind ?? null,
      reason: r.reason ?? null,
      features: parseJson<Record<string, number | null>>(r.features, {}) ?? {},
    })),
  };
}

export type CalibrationHistoryEntry = {
  runId: number;
  runName: string;
  submittedAt: string;
  stillCalibration: boolean;
  score: CalibrationScore;
};

/**
 * The rater's calibration history, oldest first: one score per submitted run that has reference
 * labels — runs since unmarked included (stillCalibration false), so unmarking keeps the history.
 */
export async function calibrationHistory(
  { studyId, userId }: { studyId: number; userId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<CalibrationHistoryEntry[]> {
  const { categories } = await studyLabels(trx, studyId);
  const rows = (await trx('votes as v')
    .join('components as c', 'c.id', 'v.component_id')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .join('assignments as a', function () {
      this.on('a.run_id', 'r.id').andOn('a.rater_id', 'v.rater_id');
    })
    .join('reference_labels as rl', 'rl.component_id', 'c.id')
    .where({ 'r.study_id': studyId, 'd.is_current': true, 'v.rater_id': userId })
    .whereNotNull('a.submitted_at')
    .orderBy([{ column: 'a.submitted_at' }, { column: 'r.id' }])
    .select(
      'v.label as rater',
      'rl.label as reference',
      'r.id as runId',
      'r.is_calibration as isCalibration',
      'a.submitted_at as submittedAt',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
    )) as Array<{
    rater: string;
    reference: string;
    runId: number;
    isCalibration: unknown;
    submittedAt: Date;
    sub: string;
    ses: string | null;
    task: string | null;
    acq: string | null;
    runLabel: string | null;
  }>;
  const byRun = new Map<number, typeof rows>();
  for (const r of rows) byRun.set(Number(r.runId), [...(byRun.get(Number(r.runId)) ?? []), r]);
  return [...byRun.values()].map((rs) => ({
    runId: Number(rs[0]!.runId),
    runName: nameOf(rs[0]!),
    submittedAt: new Date(rs[0]!.submittedAt).toISOString(),
    stillCalibration: Boolean(rs[0]!.isCalibration),
    score: scoreAgainstReference(rs, categories),
  }));
}
