// No `server-only`: tests and scripts read these too. Rows only; lib/releases/current-agreement-report.ts decides when to compute.
import { db, parseJson, toJson } from '@/lib/db/knex';

/**
 * A key that changes whenever the current-state agreement of the study can change: the submitted
 * votes (count, newest id), the assignments (count, newest id: an unassigned rater's votes stop
 * counting), the decisions (count, last update), the runs (count, last update: status and the
 * calibration flag), the current decompositions (count, newest id), the study row (label set,
 * noise kinds) and the raters' accounts (names in the report). Read in one statement.
 */
export async function agreementChangeKey({ studyId }: { studyId: number }): Promise<string> {
  const [[row]] = (await db.raw(
    `SELECT
       (SELECT CONCAT(COUNT(*), ':', COALESCE(MAX(sv.id), 0)) FROM submitted_votes sv JOIN runs r ON r.id = sv.run_id WHERE r.study_id = ?) AS votes,
       (SELECT CONCAT(COUNT(*), ':', COALESCE(MAX(a.id), 0)) FROM assignments a JOIN runs r ON r.id = a.run_id WHERE r.study_id = ?) AS assignments,
       (SELECT CONCAT(COUNT(*), ':', COALESCE(DATE_FORMAT(MAX(x.updated_at), '%Y%m%d%H%i%s%f'), '-'))
          FROM decisions x JOIN components c ON c.id = x.component_id JOIN decompositions d ON d.id = c.decomposition_id
          JOIN runs r ON r.id = d.run_id WHERE r.study_id = ?) AS decisions,
       (SELECT CONCAT(COUNT(*), ':', COALESCE(DATE_FORMAT(MAX(r.updated_at), '%Y%m%d%H%i%s%f'), '-')) FROM runs r WHERE r.study_id = ?) AS runs,
       (SELECT CONCAT(COUNT(*), ':', COALESCE(MAX(d.id), 0)) FROM decompositions d JOIN runs r ON r.id = d.run_id
          WHERE r.study_id = ? AND d.is_current = 1) AS decompositions,
       (SELECT DATE_FORMAT(s.updated_at, '%Y%m%d%H%i%s%f') FROM studies s WHERE s.id = ?) AS study,
       (SELECT COALESCE(DATE_FORMAT(MAX(u.updated_at), '%Y%m%d%H%i%s%f'), '-') FROM users u
          WHERE u.id IN (SELECT a.rater_id FROM assignments a JOIN runs r ON r.id = a.run_id WHERE r.study_id = ?)) AS raters`,
    [studyId, studyId, studyId, studyId, studyId, studyId, studyId],
  )) as [[Record<string, string | null>]];
  return ['votes', 'assignments', 'decisions', 'runs', 'decompositions', 'study', 'raters'].map((k) => `${k}=${row?.[k] ?? '-'}`).join(';');
}

export type StoredAgreement = { changeKey: string; report: unknown; runCount: number; computedAt: Date };

/** The stored current-state agreement report of a study (the JSON of lib/reports/agreement-report.ts), or null. */
export async function findStoredAgreement({ studyId }: { studyId: number }): Promise<StoredAgreement | null> {
  const row = await db('study_agreement_reports')
    .where({ study_id: studyId })
    .first('change_key as changeKey', 'report', 'run_count as runCount', 'computed_at as computedAt');
  if (!row) return null;
  return {
    changeKey: String(row.changeKey),
    report: parseJson(row.report, null),
    runCount: Number(row.runCount),
    computedAt: row.computedAt,
  };
}

/** Stores (replaces) the study's current-state agreement report with the change key it was computed from. */
export async function storeAgreement({
  studyId,
  changeKey,
  report,
  runCount,
  computedAt,
}: StoredAgreement & { studyId: number }): Promise<void> {
  await db('study_agreement_reports')
    .insert({ study_id: studyId, change_key: changeKey, report: toJson(report), run_count: runCount, computed_at: computedAt })
    .onConflict('study_id')
    .merge(['change_key', 'report', 'run_count', 'computed_at']);
}
