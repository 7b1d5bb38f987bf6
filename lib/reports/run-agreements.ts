/**
 * Krippendorff's α of each run from its submitted votes (no bootstrap), for the runs table.
 * Only for callers who see every run of the study: a rater must not learn a tally of a run
 * before submitting it.
 */
import 'server-only';
import { loadStudyRatings } from '@/lib/db/queries/agreement';
import { buildAgreementReport } from './agreement-report';

export async function runAgreements({ studyId, runIds }: { studyId: number; runIds: number[] }): Promise<Map<number, number | null>> {
  const out = new Map<number, number | null>();
  if (!runIds.length) return out;
  const report = buildAgreementReport(await loadStudyRatings({ studyId, runIds }), { resamples: 0 });
  for (const r of report.runs) out.set(r.runId, r.krippendorffAlpha.value);
  return out;
}
