/**
 * Job kind `notify-votes-complete` (payload {}): tells each study lead, once, that a run's
 * assigned raters have all submitted and how many decisions wait for them
 * (lib/notifications/votes-complete.ts). While ratings are open anywhere it queues its next check
 * QUORUM_NOTIFY_SCAN_MS later; new assignments start it again.
 */
import { votesCompleteScanMs } from '@/lib/notifications/config';
import { notifyVotesCompletePayloadSchema, NOTIFY_VOTES_COMPLETE } from '@/lib/notifications/payloads';
import { ensureNotifyJob } from '@/lib/jobs/queue-notifications';
import { ratingsOpen } from '@/lib/db/queries/votes-complete';
import { sendVotesCompleteNotices } from '@/lib/notifications/votes-complete';
import { sendDriftNotices } from '@/lib/notifications/calibration-drift';
import { defineJobKind } from '../types';

export const notifyVotesCompleteKind = defineJobKind({
  kind: NOTIFY_VOTES_COMPLETE,
  payloadSchema: notifyVotesCompletePayloadSchema,
  async run(ctx) {
    await ctx.progress('sending', 1);
    const result = await sendVotesCompleteNotices(ctx.db);
    const drift = await sendDriftNotices(ctx.db);
    if (drift.sent.length || drift.failed) ctx.logger.info(`calibration drift e-mails: ${drift.sent.length} sent, ${drift.failed} failed`);
    const next = (await ratingsOpen(ctx.db))
      ? await ensureNotifyJob(ctx.db, { kind: NOTIFY_VOTES_COMPLETE, delayMs: votesCompleteScanMs() })
      : null;
    ctx.logger.info(
      `votes-complete e-mails: ${result.sent.length} sent, ${result.failed} failed${next ? `; next check job ${next.jobId}` : ''}`,
    );
    return { sent: result.sent, failed: result.failed, nextJobId: next?.jobId ?? null };
  },
});
