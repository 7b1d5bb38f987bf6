/**
 * Queues an e-mail that carries a one-time link (invitation, password reset) for the send-mail job
 * (lib/worker/kinds/send-mail.ts): sent by the worker with retries, never from the request. The
 * outbox's readable copy has the links removed; the full message is sealed (lib/mail/seal.ts) until sent.
 */
import { insertQueuedMail } from '@/lib/db/queries/mail-outbox';
import type { Db } from '@/lib/db/transaction';
import { enqueueJob } from './queue';
import { SEND_MAIL } from '@/lib/mail/payloads';
import { sealMail, withoutSecrets } from '@/lib/mail/seal';
import type { MailContent } from '@/lib/mail/templates/layout';

export async function queueMail(
  trx: Db,
  { to, template, content, secrets }: { to: string; template: string; content: MailContent; secrets: readonly string[] },
): Promise<{ outboxId: number; jobId: number }> {
  const readable = withoutSecrets(content, secrets);
  const outboxId = await insertQueuedMail(
    { to, template, subject: readable.subject, text: readable.text, html: readable.html, sealed: sealMail(content) },
    trx,
  );
  const jobId = await enqueueJob(trx, { kind: SEND_MAIL, payload: { outboxId }, maxAttempts: 5 });
  return { outboxId, jobId };
}
