import 'server-only';
import type { Knex } from 'knex';
import { bidsName, distinctRunNames } from '@/lib/bids';
import { scoreAgainstReference, type CalibrationScore } from '@/lib/agreement/reference-score';
import { type CalibrationThreshold, type GateVerdict } from '@/lib/agreement/threshold-gate';
import type { KindSensitivity } from '@/lib/agreement/kind-sensitivity';
import { db, parseJson, toJson } from '@/lib/db/knex';
import { AppError, notFound } from '@/lib/errors';
import { recordAudit } from './audit';
import { isRunReleased } from './desk';
import { calibrationGate, calibrationSettings, calibrationThreshold, scoreRater, studyLabels } from './calibration-gate';
import { calibrationRounds, type CalibrationRoundEntry } from './calibration-rounds';

export { calibrationGate, calibrationThreshold, scoreRater };
import { findStudyAccess } from './study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import type { UserRow } from './users';

type Caller = Pick<UserRow, 'id' | 'role'>;

export type CalibrationAssignment = { raterId: number; raterName: string; labelled: number; submittedAt: Date | null };
export type CalibrationRun = {
  runId: number;
  runName: string;
  status: string;
  /** Components of the current decomposition. */
  total: number;
  /** Components with a reference label. */
  referenced: number;
  /** Components whose decision still waits (adopting references is refused while > 0). */
  pending: number;
  assignments: CalibrationAssignment[];
};
export type CalibrationCertification = {
  passed: boolean;
  certifiedBy: number | null;
  certifiedAt: Date | null;
  scores: CalibrationScore | null;
};
export type CalibrationRater = {
  id: number;
  name: string;
  active: boolean;
  /** Calibration runs the rater has submitted (scored ones). */
  submittedRuns: number;
  /** The score now, from their submitted calibration runs. */
  score: CalibrationScore;
  /** Noise sensitivity per reference noise kind (which kinds the rater misses). */
  byKind: KindSensitivity[];
  /** May the rater get live runs under the study's calibration threshold, and why not. */
  gate: GateVerdict;
  /** One score per submitted calibration run, oldest first (drift over time). */
  history: CalibrationHistoryEntry[];
  /** One pooled score per calibration round (re-calibration), oldest first. */
  rounds: CalibrationRoundEntry[];
  certification: CalibrationCertification | null;
};
export type CalibrationOverview = {
  studyName: string;
  categories: string[];
  noiseKinds: string[];
  runs: CalibrationRun[];
  /** Ready runs of the study that could be marked as calibration runs. */
  candidates: Array<{ runId: number; runName: string }>;
  raters: CalibrationRater[];
  threshold: CalibrationThreshold;
  /** Certified raters get the set again every N weeks (null: no re-calibration). */
  recalibrationWeeks: number | null;
};

const notLead = () => new AppError('forbidden', 'Only a lead of this study (or the facility admin) manages its calibration set.');
const nameOf = (r: { sub: string; ses: string | null; task: string | null; acq: string | null; runLabel: string | null }) =>
  bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel });

/** The study when the caller leads it (or is an admin): 404 when they may not see it, 403 when they may not change it. */
async function requireLead({ user, studyId }: { user: Caller; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw notLead();
  return access;
}

/** A run of this study (study id in the WHERE clause), locked for the change; 404 otherwise. */
async function lockStudyRun(trx: Knex.Transaction, { studyId, runId }: { studyId: number; runId: number }) {
  const row = await trx('runs')
    .where({ id: runId, study_id: studyId })
    .forUpdate()
    .first('id', 'status', 'is_calibration as isCalibration', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel');
  if (!row) throw notFound('The run');
  return { id: Number(row.id), status: String(row.status), isCalibration: Boolean(row.isCalibration), name: nameOf(row) };
}

async function lockCalibrationRun(trx: Knex.Transaction, where: { studyId: number; runId: number }) {
  const run = await lockStudyRun(trx, where);
  if (!run.isCalibration) throw new AppError('conflict', `${run.name} is not a calibration run. Mark it as one first.`);
  return run;
}

/** Components of the run's current decomposition with their decision and reference label. */
async function runComponents(trx: Knex | Knex.Transaction, runId: number) {
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
    )) as Array<{
    id: number;
    idx: number;
    decisionLabel: string | null;
    decisionKind: string | null;
    method: string | null;
    referenceLabel: string | null;
  }>;
}

/** The study's calibration runs, runs that could become one, and its raters with their scores and certification (leads, admins). */
export async function listCalibration({ user, studyId }: { user: Caller; studyId: number }): Promise<CalibrationOverview> {
  const access = await requireLead({ user, studyId });
  const { categories, noiseKinds } = await studyLabels(db, studyId);
  const runRows = await db('runs as r')
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
  const assignRows = await db('assignments as a')
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
  const runs: CalibrationRun[] = runRows.map((r) => ({
    runId: Number(r.runId),
    runName: nameOf(r),
    status: String(r.status),
    total: Number(r.total ?? 0),
    referenced: Number(r.referenced ?? 0),
    pending: Number(r.pending ?? 0),
    assignments: assignRows
      .filter((a) => Number(a.runId) === Number(r.runId))
      .map((a) => ({
        raterId: Number(a.raterId),
        raterName: String(a.raterName),
        labelled: Number(a.labelled ?? 0),
        submittedAt: a.submittedAt ?? null,
      })),
  }));
  const candidates = (
    await db('runs')
      .where({ study_id: studyId, is_calibration: false, status: 'ready' })
      .orderBy('id')
      .select('id as runId', 'sub', 'ses', 'task', 'acq', 'run_label as runLabel')
  ).map((r) => ({ runId: Number(r.runId), runName: nameOf(r) }));
  const members = await db('study_members as m')
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
  const raters: CalibrationRater[] = [];
  const threshold = await calibrationThreshold({ studyId });
  for (const m of members) {
    const { score, byKind, submittedRuns } = await scoreRater({ studyId, userId: Number(m.id) });
    raters.push({
      id: Number(m.id),
      name: String(m.name),
      active: Boolean(m.active),
      submittedRuns,
      score,
      byKind,
      gate: await calibrationGate({ studyId, raterId: Number(m.id) }),
      history: await calibrationHistory({ studyId, userId: Number(m.id) }),
      rounds: await calibrationRounds({ studyId, userId: Number(m.id) }),
      certification: m.certId
        ? {
            passed: Boolean(m.passed),
            certifiedBy: m.certifiedBy == null ? null : Number(m.certifiedBy),
            certifiedAt: m.certifiedAt ?? null,
            scores: parseJson<CalibrationScore>(m.scores, null),
          }
        : null,
    });
  }
  // two runs with the same entities read apart in the pickers: "… (run #12)"
  const names = new Map(
    distinctRunNames([...runs, ...candidates].map((r) => ({ runId: r.runId, name: r.runName }))).map((r) => [r.runId, r.name]),
  );
  const named = <T extends { runId: number; runName: string }>(r: T): T => ({ ...r, runName: names.get(r.runId) ?? r.runName });
  const { recalibrationWeeks } = await calibrationSettings({ studyId });
  return {
    studyName: access.name,
    categories,
    noiseKinds,
    runs: runs.map(named),
    candidates: candidates.map(named),
    raters,
    threshold,
    recalibrationWeeks,
  };
}

/** Marks a ready, unreleased run of the study as a calibration run (it leaves agreement and releases). */
export async function markCalibrationRun({
  user,
  studyId,
  runId,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  ip?: string | null;
}) {
  await requireLead({ user, studyId });
  return db.transaction(async (trx) => {
    const run = await lockStudyRun(trx, { studyId, runId });
    if (run.isCalibration) return { runId, alreadyMarked: true };
    if (run.status !== 'ready')
      throw new AppError('conflict', `${run.name} is not ready for rating yet (${run.status}); only a ready run can be a calibration run.`);
    if (await isRunReleased({ runId }, trx))
      throw new AppError('conflict', `${run.name} is already in a release, so it cannot become a calibration run.`);
    await trx('runs').where({ id: runId, study_id: studyId }).update({ is_calibration: true });
    await recordAudit(
      { actorId: user.id, action: 'calibration.run_marked', targetType: 'run', targetId: runId, studyId, detail: { run: run.name }, ip },
      trx,
    );
    return { runId, alreadyMarked: false };
  });
}

/**
 * Copies the run's current decisions into its reference labels (replacing earlier ones). Refused
 * with a 409 while any component's decision is pending: reconcile the run first.
 */
export async function adoptReferences({
  user,
  studyId,
  runId,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  ip?: string | null;
}) {
  await requireLead({ user, studyId });
  return db.transaction(async (trx) => {
    const run = await lockCalibrationRun(trx, { studyId, runId });
    const comps = await runComponents(trx, runId);
    if (comps.length === 0) throw new AppError('conflict', `${run.name} has no components to label.`);
    const pending = comps.filter((c) => !c.decisionLabel || c.method === 'pending');
    if (pending.length) {
      throw new AppError(
        'conflict',
        `${pending.length} of ${comps.length} components of ${run.name} have no decision yet (component${pending.length === 1 ? '' : 's'} ${pending
          .slice(0, 10)
          .map((c) => c.idx)
          .join(', ')}${pending.length > 10 ? '…' : ''}). Reconcile them first, or set their reference labels one by one.`,
      );
    }
    await trx('reference_labels')
      .insert(
        comps.map((c) => ({
          component_id: c.id,
          label: c.decisionLabel,
          noise_kind: c.decisionLabel === 'noise' ? c.decisionKind : null,
          set_by: user.id,
        })),
      )
      .onConflict('component_id')
      .merge(['label', 'noise_kind', 'set_by']);
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.reference_set',
        targetType: 'run',
        targetId: runId,
        studyId,
        detail: { run: run.name, adopted: comps.length },
        ip,
      },
      trx,
    );
    return { runId, referenced: comps.length };
  });
}

/** Sets one component's reference label (a key of the study's label set; a noise kind only with noise). */
export async function setReferenceLabel({
  user,
  studyId,
  runId,
  componentId,
  label,
  noiseKind,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  componentId: number;
  label: string;
  noiseKind: string | null;
  ip?: string | null;
}) {
  await requireLead({ user, studyId });
  const { categories, noiseKinds } = await studyLabels(db, studyId);
  if (!categories.includes(label))
    throw new AppError('validation', `"${label}" is not a label of this study.`, { label: [`choose one of ${categories.join(', ')}`] });
  if (noiseKind && label !== 'noise')
    throw new AppError('validation', 'A noise kind goes only with the label noise.', { noiseKind: ['only with noise'] });
  if (noiseKind && !noiseKinds.includes(noiseKind))
    throw new AppError('validation', `"${noiseKind}" is not a noise kind of this study.`, {
      noiseKind: ['not a noise kind of this study'],
    });
  return db.transaction(async (trx) => {
    const run = await lockCalibrationRun(trx, { studyId, runId });
    const comp = (await runComponents(trx, runId)).find((c) => Number(c.id) === componentId);
    if (!comp) throw notFound('The component');
    await trx('reference_labels')
      .insert({ component_id: componentId, label, noise_kind: noiseKind, set_by: user.id })
      .onConflict('component_id')
      .merge(['label', 'noise_kind', 'set_by']);
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.reference_set',
        targetType: 'run',
        targetId: runId,
        studyId,
        detail: { run: run.name, component: comp.idx, label, noiseKind },
        ip,
      },
      trx,
    );
    return { runId, componentId, label, noiseKind };
  });
}

/**
 * Gives a rater of the study an assignment on a calibration run whose every component has a
 * reference label, so they rate it in the normal desk; 409 when already assigned.
 */
export async function assignCalibrationRater({
  user,
  studyId,
  runId,
  raterId,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  raterId: number;
  ip?: string | null;
}) {
  await requireLead({ user, studyId });
  return db.transaction(async (trx) => {
    const run = await lockCalibrationRun(trx, { studyId, runId });
    const rater = await trx('study_members as m')
      .join('users as u', 'u.id', 'm.user_id')
      .where({ 'm.study_id': studyId, 'm.user_id': raterId, 'm.study_role': 'rater' })
      .first('u.id', 'u.name', 'u.active');
    if (!rater)
      throw new AppError('validation', 'That person is not a rater of this study. Add them as a rater under Protocol and members first.', {
        raterId: ['not a rater of this study'],
      });
    if (!rater.active) throw new AppError('validation', `${rater.name}'s account is deactivated.`, { raterId: ['deactivated account'] });
    const comps = await runComponents(trx, runId);
    const missing = comps.filter((c) => !c.referenceLabel).length;
    if (comps.length === 0 || missing > 0) {
      throw new AppError(
        'conflict',
        `${run.name} has ${missing || 'no'} component${missing === 1 ? '' : 's'} without a reference label. Set the reference labels before assigning raters.`,
      );
    }
    const existing = await trx('assignments').where({ run_id: runId, rater_id: raterId }).first('id');
    if (existing) throw new AppError('conflict', `${rater.name} is already assigned to ${run.name}.`);
    await trx('assignments').insert({ run_id: runId, rater_id: raterId, assigned_by: user.id });
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.assigned',
        targetType: 'run',
        targetId: runId,
        studyId,
        detail: { run: run.name, raterId, rater: rater.name },
        ip,
      },
      trx,
    );
    return { runId, raterId };
  });
}

/**
 * The lead's verdict on a rater: their scores now are stored in rater_certifications with passed,
 * certified_by and certified_at. Passing needs at least one submitted calibration run.
 */
export async function certifyRater({
  user,
  studyId,
  userId,
  passed,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  userId: number;
  passed: boolean;
  ip?: string | null;
}) {
  await requireLead({ user, studyId });
  return db.transaction(async (trx) => {
    const member = await trx('study_members as m')
      .join('users as u', 'u.id', 'm.user_id')
      .where({ 'm.study_id': studyId, 'm.user_id': userId, 'm.study_role': 'rater' })
      .forUpdate()
      .first('u.id', 'u.name');
    if (!member) throw new AppError('validation', 'That person is not a rater of this study.', { userId: ['not a rater of this study'] });
    const { score, submittedRuns } = await scoreRater({ studyId, userId }, trx);
    if (passed && (submittedRuns === 0 || score.n === 0)) {
      throw new AppError('conflict', `${member.name} has not submitted a calibration run yet, so there is no score to certify.`);
    }
    const now = new Date();
    await trx('rater_certifications')
      .insert({ study_id: studyId, user_id: userId, scores: toJson(score), passed, certified_by: user.id, certified_at: now })
      .onConflict(['study_id', 'user_id'])
      .merge(['scores', 'passed', 'certified_by', 'certified_at']);
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.certified',
        targetType: 'user',
        targetId: userId,
        studyId,
        ip,
        detail: {
          passed,
          rater: member.name,
          n: score.n,
          percentAgreement: score.percentAgreement.value,
          cohenKappa: score.cohenKappa.value,
          gwetAC1: score.gwetAC1.value,
        },
      },
      trx,
    );
    return { userId, passed, certifiedAt: now, score };
  });
}

/** The caller's own calibration score and certification in a study they are a member of (404 otherwise). */
export async function myCalibration({ user, studyId }: { user: Caller; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  const { score, byKind, submittedRuns } = await scoreRater({ studyId, userId: user.id });
  const cert = await db('rater_certifications')
    .where({ study_id: studyId, user_id: user.id })
    .first('passed', 'certified_at as certifiedAt');
  const gate = await calibrationGate({ studyId, raterId: user.id });
  return {
    submittedRuns,
    score,
    byKind,
    gate,
    certification: cert ? { passed: Boolean(cert.passed), certifiedAt: cert.certifiedAt ?? null } : null,
  };
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

/** Clears the run's calibration flag; its reference labels, votes and assignments stay. */
export async function clearCalibrationFlag({ studyId, runId }: { studyId: number; runId: number }): Promise<void> {
  await db('runs').where({ id: runId, study_id: studyId }).update({ is_calibration: false });
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
