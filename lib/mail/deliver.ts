/**
 * Sends a message now and keeps a record of it in mail_outbox (status sent, or failed with the
 * error so it can be retried). Used after the response of the invitation and reset routes.
 */
import { db } from '../db/knex';
import { sendMail } from './transport';
import type { MailContent } from './templates/layout';

export async function deliverMail({ to, content, template }: { to: string; content: MailContent; template: string }): Promise<boolean> {
  const [id] = await db('mail_outbox').insert({
    to_email: to,
    subject: content.subject.slice(0, 255),
    text_body: content.text,
    html_body: content.html,
    template,
    status: 'sending',
    attempts: 1,
  });
  try {
    await sendMail({ to, subject: content.subject, text: content.text, html: content.html });
    await db('mail_outbox').where({ id }).update({ status: 'sent', sent_at: db.fn.now(3) });
    return true;
  } catch (err) {
    console.error(`[mail] sending "${template}" to ${to} failed:`, (err as Error).message);
    await db('mail_outbox').where({ id }).update({ status: 'failed', last_error: String((err as Error).message).slice(0, 2000) });
    return false;
  }
}
