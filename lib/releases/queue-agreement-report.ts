/**
 * Asks the worker to bring the study's stored agreement report up to date (job kind
 * `agreement-report`), unless such a job is already waiting for this study. Two pages asking at the
 * same moment may queue two; the second finds the report current and computes nothing.
 */
import 'server-only';
import { findQueuedJobOfKind } from '@/lib/db/queries/jobs';
import { inTransaction } from '@/lib/db/transaction';
import { enqueueJob } from '@/lib/jobs/queue';
import { AGREEMENT_REPORT } from '@/lib/jobs/agreement-report-payload';

export function queueAgreementReport({ studyId }: { studyId: number }): Promise<number> {
  return inTransaction(async (trx) => {
    const queued = await findQueuedJobOfKind(trx, { kind: AGREEMENT_REPORT, studyId });
    if (queued !== null) return queued;
    return enqueueJob(trx, { kind: AGREEMENT_REPORT, payload: { studyId }, studyId });
  });
}
