/**
 * Sends a message now and keeps a record of it in mail_outbox (status sent, or failed with the
 * error). Used inside jobs that render their message when they run (the notifications); messages
 * with one-time links go through queueMail (./queue-mail.ts) instead.
 */
import { insertSendingMail, markMailFailed, markMailSent } from '@/lib/db/queries/mail-outbox';
import { sendMail } from './transport';
import type { MailContent } from './templates/layout';

export async function deliverMail({ to, content, template }: { to: string; content: MailContent; template: string }): Promise<boolean> {
  const id = await insertSendingMail({ to, subject: content.subject, text: content.text, html: content.html, template });
  try {
    await sendMail({ to, subject: content.subject, text: content.text, html: content.html });
    await markMailSent({ id });
    return true;
  } catch (err) {
    console.error(`[mail] sending "${template}" to ${to} failed:`, (err as Error).message);
    await markMailFailed({ id, error: String((err as Error).message) });
    return false;
  }
}
