/**
 * The calibration page's overview (leads, admins): the study's calibration runs, ready runs that
 * could become one, and its raters with their scores, gate verdict, history, rounds and certification.
 */
import 'server-only';
import { distinctRunNames } from '@/lib/bids';
import type { CalibrationScore } from '@/lib/agreement/reference-score';
import type { CalibrationThreshold, GateVerdict } from '@/lib/agreement/threshold-gate';
import type { KindSensitivity } from '@/lib/agreement/kind-sensitivity';
import {
  calibrationHistory,
  calibrationLabels,
  listCalibrationAssignments,
  listCalibrationCandidates,
  listCalibrationRuns,
  listStudyRatersWithCertification,
  type CalibrationHistoryEntry,
  type CertificationRecord,
} from '@/lib/db/queries/calibration';
import { calibrationGate, calibrationSettings, calibrationThreshold, scoreRater } from '@/lib/db/queries/calibration-gate';
import { calibrationRounds, type CalibrationRoundEntry } from '@/lib/db/queries/calibration-rounds';
import { requireCalibrationLead, type Caller } from './lead-only';

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
  certification: CertificationRecord | null;
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

export async function listCalibration({ user, studyId }: { user: Caller; studyId: number }): Promise<CalibrationOverview> {
  const access = await requireCalibrationLead({ user, studyId });
  const { categories, noiseKinds } = await calibrationLabels({ studyId });
  const assignments = await listCalibrationAssignments({ studyId });
  const runs: CalibrationRun[] = (await listCalibrationRuns({ studyId })).map((r) => ({
    ...r,
    assignments: assignments.filter((a) => a.runId === r.runId).map(({ runId: _runId, ...a }) => a),
  }));
  const candidates = await listCalibrationCandidates({ studyId });
  const raters: CalibrationRater[] = [];
  const threshold = await calibrationThreshold({ studyId });
  for (const m of await listStudyRatersWithCertification({ studyId })) {
    const { score, byKind, submittedRuns } = await scoreRater({ studyId, userId: m.id });
    raters.push({
      id: m.id,
      name: m.name,
      active: m.active,
      submittedRuns,
      score,
      byKind,
      gate: await calibrationGate({ studyId, raterId: m.id }),
      history: await calibrationHistory({ studyId, userId: m.id }),
      rounds: await calibrationRounds({ studyId, userId: m.id }),
      certification: m.certification,
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
