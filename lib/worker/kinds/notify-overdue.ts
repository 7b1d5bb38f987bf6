/**
 * Job kind `notify-overdue` (payload { repeat }): the daily summary of overdue work
 * (lib/notifications/overdue.ts) to each study lead. With repeat (the default) it queues itself
 * again for the next QUORUM_OVERDUE_HOUR_UTC (default 07:00 UTC), so one job a day stays queued
 * once assignments exist.
 */
import { notifyOverduePayloadSchema, NOTIFY_OVERDUE } from '@/lib/notifications/payloads';
import { ensureDailyOverdue } from '@/lib/jobs/queue-notifications';
import { sendOverdueSummaries } from '@/lib/notifications/overdue';
import { defineJobKind } from '../types';

export const notifyOverdueKind = defineJobKind({
  kind: NOTIFY_OVERDUE,
  payloadSchema: notifyOverduePayloadSchema,
  async run(ctx) {
    await ctx.progress('sending', 1);
    const result = await sendOverdueSummaries(ctx.db);
    if (ctx.payload.repeat) await ensureDailyOverdue(ctx.db);
    ctx.logger.info(`overdue summaries: ${result.sent.length} sent, ${result.failed} failed`);
    return result;
  },
});
