/**
 * The study's current-state agreement report (the report page without ?release), computed once per
 * change of the ratings instead of on every view: stored in study_agreement_reports with the change
 * key it was computed from (lib/db/queries/current-agreement.ts). Same scheme and figures as a
 * release's report: buildAgreementReport over loadStudyRatings with BOOTSTRAP (1000 resamples, seed 1).
 */
import 'server-only';
import { loadStudyRatings } from '@/lib/db/queries/agreement';
import { agreementChangeKey, findStoredAgreement, storeAgreement } from '@/lib/db/queries/current-agreement';
import { buildAgreementReport, type AgreementReport } from '@/lib/reports/agreement-report';
import { BOOTSTRAP } from './create-release';

export type CurrentAgreement = {
  /** The last stored figures (null: never computed yet). */
  stored: { report: AgreementReport; runCount: number; computedAt: Date } | null;
  /** The stored figures describe the ratings as they are now. */
  fresh: boolean;
};

/** What the page shows: the stored report and whether it is still current (no computation). */
export async function readCurrentAgreementReport({ studyId }: { studyId: number }): Promise<CurrentAgreement> {
  const [key, stored] = await Promise.all([agreementChangeKey({ studyId }), findStoredAgreement({ studyId })]);
  if (!stored) return { stored: null, fresh: false };
  return {
    stored: { report: stored.report as AgreementReport, runCount: stored.runCount, computedAt: stored.computedAt },
    fresh: stored.changeKey === key,
  };
}

// one computation per study at a time in this process (several views of a stale page share it)
const inFlight = new Map<number, Promise<{ recomputed: boolean }>>();

/**
 * Computes and stores the report when the ratings changed since the stored one (or none is stored);
 * does nothing when the change key is the same. The key is read before the ratings, so a change
 * that lands while computing leaves a key that differs, and the next view computes again.
 */
export function refreshCurrentAgreementReport({ studyId }: { studyId: number }): Promise<{ recomputed: boolean }> {
  const running = inFlight.get(studyId);
  if (running) return running;
  const work = (async () => {
    const changeKey = await agreementChangeKey({ studyId });
    const stored = await findStoredAgreement({ studyId });
    if (stored?.changeKey === changeKey) return { recomputed: false };
    const ratings = await loadStudyRatings({ studyId });
    const report = buildAgreementReport(ratings, BOOTSTRAP);
    await storeAgreement({ studyId, changeKey, report, runCount: ratings.runs.length, computedAt: new Date() });
    return { recomputed: true };
  })().finally(() => inFlight.delete(studyId));
  inFlight.set(studyId, work);
  return work;
}
