/**
 * Job kind `notify-assignments` (payload {}): queued by lib/jobs/queue-notifications.ts when
 * assignments are created, to start QUORUM_NOTIFY_BATCH_MS later, so every assignment made in that
 * window reaches each rater as one e-mail (lib/notifications/send-assignments.ts). A delivery that
 * failed leaves those assignments unnotified and retries the job.
 */
import { sendAssignmentNotices } from '@/lib/notifications/send-assignments';
import { notifyAssignmentsPayloadSchema, NOTIFY_ASSIGNMENTS } from '@/lib/notifications/payloads';
import { JobError } from '@/lib/jobs/errors';
import { defineJobKind } from '../types';

export const notifyAssignmentsKind = defineJobKind({
  kind: NOTIFY_ASSIGNMENTS,
  payloadSchema: notifyAssignmentsPayloadSchema,
  async run(ctx) {
    await ctx.progress('sending', 1);
    const result = await sendAssignmentNotices(ctx.db);
    ctx.logger.info(`assignment e-mails: ${result.sent.length} sent, ${result.failed.length} failed`);
    if (result.failed.length)
      throw new JobError(`The assignment e-mail to ${result.failed.length} rater(s) could not be sent; it is tried again.`);
    return { sent: result.sent };
  },
});
