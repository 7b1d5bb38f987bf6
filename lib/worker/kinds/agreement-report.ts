/**
 * Job kind `agreement-report` (payload { studyId }): computes and stores the study's current-state
 * agreement report when its ratings changed since the stored one (lib/releases/current-agreement-report.ts;
 * nothing to do when it is current). Queued by the report page when it shows stale figures, so the
 * 1000-resample bootstrap runs here and not in the web process.
 */
import { refreshCurrentAgreementReport } from '@/lib/releases/current-agreement-report';
import { AGREEMENT_REPORT, agreementReportPayloadSchema } from '@/lib/jobs/agreement-report-payload';
import { defineJobKind } from '../types';

export const agreementReportKind = defineJobKind({
  kind: AGREEMENT_REPORT,
  payloadSchema: agreementReportPayloadSchema,
  async run(ctx) {
    await ctx.progress('computing', 1);
    const { recomputed } = await refreshCurrentAgreementReport({ studyId: ctx.payload.studyId });
    ctx.logger.info(`study ${ctx.payload.studyId}: agreement report ${recomputed ? 'computed and stored' : 'already current'}`);
    return { recomputed };
  },
});
