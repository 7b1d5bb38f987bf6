/**
 * Job kind `send-mail` (payload { outboxId }): sends one queued e-mail (lib/jobs/queue-mail.ts).
 * Opens the sealed message with the server secret, sends it, marks the outbox row sent and drops
 * the sealed copy. A failure to send is retried with back-off (5 attempts); the last failure also
 * drops the sealed copy. A message this worker cannot open (another NEXTAUTH_SECRET) fails at once.
 */
import { findOutboxMail, markMailFailed, markMailSent } from '@/lib/db/queries/mail-outbox';
import { openMail } from '@/lib/mail/seal';
import { sendMailPayloadSchema, SEND_MAIL } from '@/lib/mail/payloads';
import { sendMail } from '@/lib/mail/transport';
import { JobError, PermanentJobError } from '@/lib/jobs/errors';
import { defineJobKind } from '../types';

export const sendMailKind = defineJobKind({
  kind: SEND_MAIL,
  payloadSchema: sendMailPayloadSchema,
  async run(ctx) {
    const mail = await findOutboxMail({ id: ctx.payload.outboxId }, ctx.db);
    if (!mail) throw new PermanentJobError(`Outbox message ${ctx.payload.outboxId} no longer exists.`);
    if (mail.status === 'sent') return { sent: false, reason: 'already sent' };
    const content = mail.sealed ? openMail(mail.sealed) : null;
    if (!content) {
      const why = mail.sealed
        ? 'The queued e-mail cannot be opened with this worker’s NEXTAUTH_SECRET; run the worker with the web server’s secret.'
        : 'The queued e-mail has no content left to send.';
      await markMailFailed({ id: mail.id, error: why, final: true }, ctx.db);
      throw new PermanentJobError(why);
    }
    await ctx.progress('sending', 50);
    try {
      await sendMail({ to: mail.toEmail, subject: content.subject, text: content.text, html: content.html });
    } catch (err) {
      const message = String((err as Error).message);
      const final = ctx.job.attempts >= ctx.job.maxAttempts;
      await markMailFailed({ id: mail.id, error: message, countAttempt: true, final }, ctx.db);
      throw new JobError(`The e-mail (${mail.template ?? 'message'}) could not be sent: ${message.slice(0, 200)}`);
    }
    await markMailSent({ id: mail.id, countAttempt: true }, ctx.db);
    return { sent: true };
  },
});
