// Calibration scores and the threshold gate, SQL only. Kept apart from ./calibration.ts and without
// `server-only` because the worker (automatic assignment in the decompose job, the drift e-mail in
// the votes-complete check) runs outside Next.js and without the react-server condition.
import type { Knex } from 'knex';
import { db, parseJson } from '@/lib/db/knex';
import { gateVerdict, isGated, type CalibrationThreshold, type GateVerdict } from '@/lib/agreement/threshold-gate';
import { sensitivityByKind } from '@/lib/agreement/kind-sensitivity';
import { scoreAgainstReference, type CalibrationScore } from '@/lib/agreement/reference-score';

export async function studyLabels(trx: Knex | Knex.Transaction, studyId: number) {
  const s = await trx('studies').where({ id: studyId }).first('label_set as labelSet', 'noise_kinds as noiseKinds');
  return {
    categories: parseJson<string[]>(s?.labelSet, ['signal', 'noise', 'uncertain']) ?? [],
    noiseKinds: parseJson<string[]>(s?.noiseKinds, []) ?? [],
  };
}

/**
 * The rater's votes on the components of the study's calibration runs they have submitted (current
 * decomposition), each with its reference label, scored with lib/calibration/score.
 */
export async function scoreRater({ studyId, userId }: { studyId: number; userId: number }, trx: Knex | Knex.Transaction = db) {
  const { categories } = await studyLabels(trx, studyId);
  const rows = (await trx('votes as v')
    .join('components as c', 'c.id', 'v.component_id')
    .join('decompositions as d', 'd.id', 'c.decomposition_id')
    .join('runs as r', 'r.id', 'd.run_id')
    .join('assignments as a', function () {
      this.on('a.run_id', 'r.id').andOn('a.rater_id', 'v.rater_id');
    })
    .join('reference_labels as rl', 'rl.component_id', 'c.id')
    .where({ 'r.study_id': studyId, 'r.is_calibration': true, 'd.is_current': true, 'v.rater_id': userId })
    .whereNotNull('a.submitted_at')
    .select('v.label as rater', 'rl.label as reference', 'rl.noise_kind as referenceKind', 'r.id as runId')) as Array<{
    rater: string;
    reference: string;
    referenceKind: string | null;
    runId: number;
  }>;
  return {
    score: scoreAgainstReference(rows, categories),
    byKind: sensitivityByKind(rows),
    submittedRuns: new Set(rows.map((r) => Number(r.runId))).size,
  };
}

/** The study's calibration threshold (both null: no gate). */
export async function calibrationThreshold(
  { studyId }: { studyId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<CalibrationThreshold> {
  const s = await trx('studies')
    .where({ id: studyId })
    .first('calibration_min_ac1 as minAc1', 'calibration_min_sensitivity as minSensitivity', 'calibration_set_name as setName');
  return {
    minAc1: s?.minAc1 == null ? null : Number(s.minAc1),
    minSensitivity: s?.minSensitivity == null ? null : Number(s.minSensitivity),
    setName: s?.setName ?? null,
  };
}

/** The study's calibration settings: the threshold, the set's name and the re-calibration interval. */
export type CalibrationSettings = {
  minAc1: number | null;
  minSensitivity: number | null;
  setName: string | null;
  recalibrationWeeks: number | null;
};

export async function calibrationSettings(
  { studyId }: { studyId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<CalibrationSettings> {
  const t = await calibrationThreshold({ studyId }, trx);
  const s = await trx('studies').where({ id: studyId }).first('recalibration_weeks as weeks');
  return {
    minAc1: t.minAc1,
    minSensitivity: t.minSensitivity,
    setName: t.setName ?? null,
    recalibrationWeeks: s?.weeks == null ? null : Number(s.weeks),
  };
}

/** Writes the threshold; the set's name and the re-calibration interval only when given (undefined keeps them). */
export async function setCalibrationThreshold(
  { studyId, threshold }: { studyId: number; threshold: CalibrationThreshold & { recalibrationWeeks?: number | null } },
  trx: Knex | Knex.Transaction = db,
): Promise<void> {
  await trx('studies')
    .where({ id: studyId })
    .update({
      calibration_min_ac1: threshold.minAc1,
      calibration_min_sensitivity: threshold.minSensitivity,
      ...(threshold.setName !== undefined ? { calibration_set_name: threshold.setName } : {}),
      ...(threshold.recalibrationWeeks !== undefined ? { recalibration_weeks: threshold.recalibrationWeeks } : {}),
    });
}

/** Whether the rater may get live runs of the study under its calibration threshold, and why not. */
export async function calibrationGate(
  { studyId, raterId }: { studyId: number; raterId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<GateVerdict> {
  const t = await calibrationThreshold({ studyId }, trx);
  if (!isGated(t)) return gateVerdict(null, t);
  const { score } = await scoreRater({ studyId, userId: raterId }, trx);
  if (score.n === 0) {
    // a re-calibration round in progress (votes cleared, nothing submitted yet): the last finished
    // round still stands, so a certified rater keeps their live work while re-calibrating
    const last = await trx('calibration_rounds').where({ study_id: studyId, rater_id: raterId }).orderBy('round', 'desc').first('score');
    const previous = last ? parseJson<CalibrationScore>(last.score, null) : null;
    if (previous) return gateVerdict(previous, t);
  }
  return gateVerdict(score, t);
}

export type RaterGateNotice = { studyId: number; studyName: string; setName: string | null; reason: string };

/** The studies where the rater is held back from live runs by the calibration threshold, with the reason (their home page says why). */
export async function raterGateNotices({ raterId }: { raterId: number }, trx: Knex | Knex.Transaction = db): Promise<RaterGateNotice[]> {
  const studies = await trx('study_members as m')
    .join('studies as s', 's.id', 'm.study_id')
    .where({ 'm.user_id': raterId, 'm.study_role': 'rater' })
    .where((q) => q.whereNotNull('s.calibration_min_ac1').orWhereNotNull('s.calibration_min_sensitivity'))
    .orderBy('s.name')
    .select('s.id', 's.name', 's.calibration_set_name as setName');
  const out: RaterGateNotice[] = [];
  for (const s of studies) {
    const gate = await calibrationGate({ studyId: Number(s.id), raterId }, trx);
    if (!gate.passes)
      out.push({
        studyId: Number(s.id),
        studyName: String(s.name),
        setName: s.setName ?? null,
        reason: gate.reason ?? 'below the calibration threshold',
      });
  }
  return out;
}
