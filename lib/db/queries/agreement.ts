import 'server-only';
import { db, parseJson } from '@/lib/db/knex';

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
 * The votes of a study that count for agreement: each rater's votes as they stood when the rater
 * FIRST submitted the run (submitted_votes; a change after a lead reopened the run never replaces
 * them, so the statistics describe the blind, independent ratings), on the current decomposition
 * of each run, from raters still assigned to it (work in progress does not move the numbers), and
 * the decisions of those components. Calibration runs (certifying new raters) do not count.
 * Optionally limited to some runs (a run release).
 */
export async function loadStudyRatings({ studyId, runIds }: { studyId: number; runIds?: number[] }) {
  const study = await db('studies').where({ id: studyId }).first('label_set as labelSet', 'noise_kinds as noiseKinds', 'name');
  const scope = <T extends { whereIn: (c: string, v: number[]) => T }>(q: T) => (runIds ? q.whereIn('r.id', runIds) : q);
  const votes: VoteRecord[] = await scope(
    db('submitted_votes as v')
      .join('components as c', 'c.id', 'v.component_id')
      .join('decompositions as d', 'd.id', 'c.decomposition_id')
      .join('runs as r', 'r.id', 'd.run_id')
      .join('assignments as a', function () {
        this.on('a.run_id', 'r.id').andOn('a.rater_id', 'v.rater_id');
      })
      .join('users as u', 'u.id', 'v.rater_id')
      .where({ 'r.study_id': studyId, 'd.is_current': true, 'r.is_calibration': false }),
  ).select(
    'v.component_id as componentId',
    'r.id as runId',
    'v.rater_id as raterId',
    'u.name as raterName',
    'v.label',
    'v.noise_kind as noiseKind',
    'v.submitted_at as updatedAt',
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

/** What the methods paragraph must state about how the ratings were made (issue 13 item 2, issue 15 item 8). */
export type RatingFacts = {
  blinding: boolean;
  showVotesAfterSubmit: boolean;
  /** Assignments in scope that a lead reopened after submission, and how many reopenings in all. */
  reopened: { assignments: number; times: number };
  /** Raters with a submitted vote in scope, and those of them who passed the study's calibration set (null: the study certifies nobody). */
  raters: number;
  certified: number | null;
};

/**
 * The facts about the ratings of a study (or some runs) the methods paragraph states: the study's
 * blinding settings, how often a lead reopened a submitted run, and how many of the raters had
 * passed certification on the study's calibration set (null when the study has no certification
 * records at all, i.e. nobody was certified).
 */
export async function loadRatingFacts({ studyId, runIds }: { studyId: number; runIds?: number[] }): Promise<RatingFacts> {
  const study = await db('studies').where({ id: studyId }).first('blinding', 'show_votes_after_submit as showVotesAfterSubmit');
  const scoped = () => {
    const q = db('assignments as a').join('runs as r', 'r.id', 'a.run_id').where({ 'r.study_id': studyId, 'r.is_calibration': false });
    return runIds ? q.whereIn('r.id', runIds) : q;
  };
  const reopened = await scoped()
    .where('a.reopen_count', '>', 0)
    .first(db.raw('COUNT(*) as n'), db.raw('COALESCE(SUM(a.reopen_count), 0) as times'));
  const raterIds = (await scoped().whereNotNull('a.first_submitted_at').distinct('a.rater_id as id')).map((r: { id: number }) =>
    Number(r.id),
  );
  const certs = await db('rater_certifications').where({ study_id: studyId }).select('user_id', 'passed');
  const passed = new Set(certs.filter((c: { passed: unknown }) => Boolean(c.passed)).map((c: { user_id: number }) => Number(c.user_id)));
  return {
    blinding: Boolean(study?.blinding),
    showVotesAfterSubmit: Boolean(study?.showVotesAfterSubmit),
    reopened: { assignments: Number(reopened?.n ?? 0), times: Number(reopened?.times ?? 0) },
    raters: raterIds.length,
    certified: certs.length ? raterIds.filter((id) => passed.has(id)).length : null,
  };
}
