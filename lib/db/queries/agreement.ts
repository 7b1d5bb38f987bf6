import 'server-only';
import { db, parseJson } from '@/lib/db/knex';
import { buildAgreementReport } from '@/lib/reports/agreement-report';

export type VoteRecord = {
  componentId: number;
  runId: number;
  raterId: number;
  raterName: string;
  label: string;
  noiseKind: string | null;
  updatedAt: Date;
};

export type DecisionRecord = { componentId: number; runId: number; label: string | null; noiseKind: string | null; method: string };

/**
 * The votes of a study that count for agreement: votes on the current decomposition of each run,
 * from raters who have submitted that run (work in progress does not move the numbers), and the
 * decisions of those components. Calibration runs (certifying new raters) do not count.
 * Optionally limited to some runs (a run release).
 */
export async function loadStudyRatings({ studyId, runIds }: { studyId: number; runIds?: number[] }) {
  const study = await db('studies').where({ id: studyId }).first('label_set as labelSet', 'noise_kinds as noiseKinds', 'name');
  const scope = <T extends { whereIn: (c: string, v: number[]) => T }>(q: T) => (runIds ? q.whereIn('r.id', runIds) : q);
  const votes: VoteRecord[] = await scope(
    db('votes as v')
      .join('components as c', 'c.id', 'v.component_id')
      .join('decompositions as d', 'd.id', 'c.decomposition_id')
      .join('runs as r', 'r.id', 'd.run_id')
      .join('assignments as a', function () {
        this.on('a.run_id', 'r.id').andOn('a.rater_id', 'v.rater_id');
      })
      .join('users as u', 'u.id', 'v.rater_id')
      .where({ 'r.study_id': studyId, 'd.is_current': true, 'r.is_calibration': false })
      .whereNotNull('a.submitted_at'),
  ).select(
    'v.component_id as componentId',
    'r.id as runId',
    'v.rater_id as raterId',
    'u.name as raterName',
    'v.label',
    'v.noise_kind as noiseKind',
    'v.updated_at as updatedAt',
  );
  const decisions: DecisionRecord[] = await scope(
    db('decisions as x')
      .join('components as c', 'c.id', 'x.component_id')
      .join('decompositions as d', 'd.id', 'c.decomposition_id')
      .join('runs as r', 'r.id', 'd.run_id')
      .where({ 'r.study_id': studyId, 'd.is_current': true, 'r.is_calibration': false }),
  ).select('x.component_id as componentId', 'r.id as runId', 'x.label', 'x.noise_kind as noiseKind', 'x.method');
  const runs = await scope(db('runs as r').where('r.study_id', studyId)).select(
    'r.id',
    'r.sub',
    'r.ses',
    'r.task',
    'r.acq',
    'r.run_label as runLabel',
  );
  return {
    studyName: study?.name as string,
    categories: parseJson<string[]>(study?.labelSet, ['signal', 'noise', 'uncertain']) ?? [],
    noiseKinds: parseJson<string[]>(study?.noiseKinds, []) ?? [],
    votes,
    decisions,
    runs,
  };
}

/**
 * Krippendorff's α of each run from its submitted votes (no bootstrap), for the runs table.
 * Only for callers who see every run of the study: a rater must not learn a tally of a run
 * before submitting it.
 */
export async function runAgreements({ studyId, runIds }: { studyId: number; runIds: number[] }): Promise<Map<number, number | null>> {
  const out = new Map<number, number | null>();
  if (!runIds.length) return out;
  const report = buildAgreementReport(await loadStudyRatings({ studyId, runIds }), { resamples: 0 });
  for (const r of report.runs) out.set(r.runId, r.krippendorffAlpha.value);
  return out;
}
