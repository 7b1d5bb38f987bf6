// Re-calibration rounds, SQL only. Without `server-only`: the worker's `recalibrate` job runs it.
// A round is the rater's pass over the study's calibration set. A re-calibration closes the round
// in progress (its pooled score goes into calibration_rounds), clears the rater's votes on the
// set and reopens or adds the assignments, so the set is rated afresh; the round in progress is
// scored live from the votes (lib/db/queries/calibration-gate.ts scoreRater).
import type { Knex } from 'knex';
import { db, toJson } from '@/lib/db/knex';
import { scoreRater } from './calibration-gate';

const WEEK_MS = 7 * 24 * 3600 * 1000;

export type RecalibrationDue = { studyId: number; raterId: number; lastSubmittedAt: Date; weeks: number };

/**
 * Certified (passed), active raters of studies with a re-calibration interval whose latest
 * submission on the study's calibration set is at least `weeks` weeks before `now` and who have no
 * open (unsubmitted) assignment on it. A study whose calibration set has a run without complete
 * reference labels is left out (nothing fit to assign).
 */
export async function dueRecalibrations({ now }: { now: Date }, trx: Knex | Knex.Transaction = db): Promise<RecalibrationDue[]> {
  const rows = await trx('rater_certifications as rc')
    .join('studies as s', 's.id', 'rc.study_id')
    .join('users as u', 'u.id', 'rc.user_id')
    .join('study_members as m', function () {
      this.on('m.study_id', 'rc.study_id')
        .andOn('m.user_id', 'rc.user_id')
        .andOn('m.study_role', trx.raw('?', ['rater']));
    })
    .where({ 'rc.passed': true, 'u.active': true })
    .whereNotNull('s.recalibration_weeks')
    .select('rc.study_id as studyId', 'rc.user_id as raterId', 's.recalibration_weeks as weeks');
  const due: RecalibrationDue[] = [];
  for (const r of rows) {
    const studyId = Number(r.studyId),
      raterId = Number(r.raterId),
      weeks = Number(r.weeks);
    const state = await raterSetState(trx, { studyId, raterId });
    if (!state.lastSubmittedAt || state.open > 0 || !(await setIsComplete(trx, studyId))) continue;
    if (now.getTime() - state.lastSubmittedAt.getTime() >= weeks * WEEK_MS)
      due.push({ studyId, raterId, lastSubmittedAt: state.lastSubmittedAt, weeks });
  }
  return due;
}

/** The rater's latest submission on the study's calibration set and how many of its assignments are open. */
async function raterSetState(trx: Knex | Knex.Transaction, { studyId, raterId }: { studyId: number; raterId: number }, lock = false) {
  const q = trx('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .where({ 'r.study_id': studyId, 'r.is_calibration': true, 'a.rater_id': raterId })
    .select('a.id', 'a.run_id as runId', 'a.submitted_at as submittedAt');
  const rows = (await (lock ? q.forUpdate() : q)) as Array<{ id: number; runId: number; submittedAt: Date | null }>;
  const submitted = rows.filter((a) => a.submittedAt).map((a) => new Date(a.submittedAt!).getTime());
  return {
    rows,
    open: rows.filter((a) => !a.submittedAt).length,
    lastSubmittedAt: submitted.length ? new Date(Math.max(...submitted)) : null,
  };
}

/** Calibration runs of the study whose every current component has a reference label (at least one run). */
async function completeSetRuns(trx: Knex | Knex.Transaction, studyId: number): Promise<number[]> {
  const rows = await trx('runs as r')
    .join('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', trx.raw('1'));
    })
    .join('components as c', 'c.decomposition_id', 'd.id')
    .leftJoin('reference_labels as rl', 'rl.component_id', 'c.id')
    .where({ 'r.study_id': studyId, 'r.is_calibration': true, 'r.status': 'ready' })
    .groupBy('r.id')
    .select('r.id', trx.raw('COUNT(c.id) as total'), trx.raw('COUNT(rl.id) as referenced'));
  return rows
    .filter((r: { total: number; referenced: number }) => Number(r.total) > 0 && Number(r.total) === Number(r.referenced))
    .map((r: { id: number }) => Number(r.id));
}

async function setIsComplete(trx: Knex | Knex.Transaction, studyId: number): Promise<boolean> {
  const all = await trx('runs').where({ study_id: studyId, is_calibration: true }).count({ n: '*' }).first();
  const complete = await completeSetRuns(trx, studyId);
  return complete.length > 0 && complete.length === Number(all?.n ?? 0);
}

/**
 * Starts the next round for one rater, inside the caller's transaction, when it is still due (the
 * rater's calibration assignments are locked first, so two workers cannot both start it): stores
 * the finished round's score and votes, clears the rater's votes on the set and reopens or adds every
 * assignment. Returns null when not due (already open, or too recent).
 */
export async function startRecalibrationRound(
  trx: Knex.Transaction,
  { studyId, raterId, now, dueAt }: { studyId: number; raterId: number; now: Date; dueAt: Date | null },
): Promise<{ round: number; runIds: number[]; closed: { ac1: number | null; sensitivity: number | null } } | null> {
  const study = await trx('studies')
    .where({ id: studyId })
    .forUpdate()
    .first('recalibration_weeks as weeks', 'calibration_set_name as setName');
  if (study?.weeks == null) return null;
  const state = await raterSetState(trx, { studyId, raterId }, true);
  if (!state.lastSubmittedAt || state.open > 0) return null;
  if (now.getTime() - state.lastSubmittedAt.getTime() < Number(study.weeks) * WEEK_MS) return null;
  const runIds = await completeSetRuns(trx, studyId);
  if (!runIds.length) return null;

  const { score } = await scoreRater({ studyId, userId: raterId }, trx);
  const last = await trx('calibration_rounds').where({ study_id: studyId, rater_id: raterId }).max({ round: 'round' }).first();
  const round = Number(last?.round ?? 0) + 1;
  const components = trx('components as c')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .whereIn('d.run_id', runIds)
    .select('c.id');
  // the round's votes are kept with its score before they are cleared for the next round
  const votes = await trx('votes')
    .where({ rater_id: raterId })
    .whereIn('component_id', components.clone())
    .orderBy('component_id')
    .select(
      'component_id as componentId',
      'run_id as runId',
      'label',
      'noise_kind as noiseKind',
      'confidence',
      'note',
      'updated_at as votedAt',
    );
  await trx('calibration_rounds').insert({
    study_id: studyId,
    rater_id: raterId,
    round,
    set_name: study.setName ?? null,
    submitted_at: state.lastSubmittedAt,
    components: score.n,
    ac1: score.gwetAC1.value,
    sensitivity: score.noise.sensitivity.value,
    score: toJson(score),
    votes: toJson(votes.map((v) => ({ ...v, confidence: v.confidence == null ? null : Number(v.confidence) }))),
  });
  await trx('votes').where({ rater_id: raterId }).whereIn('component_id', components.clone()).delete();
  await trx('submitted_votes').where({ rater_id: raterId }).whereIn('component_id', components.clone()).delete();
  const had = new Set(state.rows.map((a) => Number(a.runId)));
  await trx('assignments')
    .where({ rater_id: raterId })
    .whereIn(
      'run_id',
      runIds.filter((id) => had.has(id)),
    )
    .update({
      submitted_at: null,
      first_submitted_at: null,
      started_at: null,
      last_component_idx: null,
      notified_at: null,
      due_at: dueAt,
      assigned_by: null,
    });
  const fresh = runIds.filter((id) => !had.has(id));
  if (fresh.length)
    await trx('assignments').insert(fresh.map((runId) => ({ run_id: runId, rater_id: raterId, due_at: dueAt, assigned_by: null })));
  return { round, runIds, closed: { ac1: score.gwetAC1.value, sensitivity: score.noise.sensitivity.value } };
}

export type CalibrationRoundEntry = {
  round: number;
  setName: string | null;
  submittedAt: string;
  components: number;
  ac1: number | null;
  sensitivity: number | null;
  /** false for the round in progress (scored live from the current votes). */
  closed: boolean;
};

/**
 * The rater's calibration rounds, oldest first: the closed ones from calibration_rounds, then the
 * current round when the rater has submitted on the set since (scored from the current votes).
 */
export async function calibrationRounds(
  { studyId, userId }: { studyId: number; userId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<CalibrationRoundEntry[]> {
  const closed = (await trx('calibration_rounds')
    .where({ study_id: studyId, rater_id: userId })
    .orderBy('round')
    .select('round', 'set_name as setName', 'submitted_at as submittedAt', 'components', 'ac1', 'sensitivity', 'score')) as Array<{
    round: number;
    setName: string | null;
    submittedAt: Date;
    components: number;
    ac1: number | null;
    sensitivity: number | null;
    score: unknown;
  }>;
  const out: CalibrationRoundEntry[] = closed.map((r) => ({
    round: Number(r.round),
    setName: r.setName ?? null,
    submittedAt: new Date(r.submittedAt).toISOString(),
    components: Number(r.components),
    ac1: r.ac1 == null ? null : Number(r.ac1),
    sensitivity: r.sensitivity == null ? null : Number(r.sensitivity),
    closed: true,
  }));
  const state = await raterSetState(trx, { studyId, raterId: userId });
  const { score } = await scoreRater({ studyId, userId }, trx);
  if (state.lastSubmittedAt && score.n > 0) {
    const s = await trx('studies').where({ id: studyId }).first('calibration_set_name as setName');
    out.push({
      round: out.length ? out[out.length - 1]!.round + 1 : 1,
      setName: s?.setName ?? null,
      submittedAt: state.lastSubmittedAt.toISOString(),
      components: score.n,
      ac1: score.gwetAC1.value,
      sensitivity: score.noise.sensitivity.value,
      closed: false,
    });
  }
  return out;
}

/** True while some study has a re-calibration interval (recalibration_weeks set). */
export async function anyStudyRecalibrates(trx: Knex | Knex.Transaction = db): Promise<boolean> {
  return Boolean(await trx('studies').whereNotNull('recalibration_weeks').first('id'));
}
