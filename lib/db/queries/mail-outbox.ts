// mail_outbox: every e-mail the product sends, its state, and (while it waits) its sealed content.
import type { Knex } from 'knex';
import { db as defaultDb } from '@/lib/db/knex';

export type OutboxMail = { id: number; toEmail: string; template: string | null; status: string; sealed: string | null };

/** A message about to be sent now by the caller (status 'sending'); returns its id. */
export async function insertSendingMail({
  to,
  subject,
  text,
  html,
  template,
}: {
  to: string;
  subject: string;
  text: string;
  html: string;
  template: string;
}): Promise<number> {
  const [id] = await defaultDb('mail_outbox').insert({
    to_email: to,
    subject: subject.slice(0, 255),
    text_body: text,
    html_body: html,
    template,
    status: 'sending',
    attempts: 1,
  });
  return Number(id);
}

/** A message for the send-mail job: readable copy without secrets, the full message sealed. */
export async function insertQueuedMail(
  {
    to,
    subject,
    text,
    html,
    template,
    sealed,
  }: { to: string; subject: string; text: string; html: string; template: string; sealed: string },
  trx: Knex = defaultDb,
): Promise<number> {
  const [id] = await trx('mail_outbox').insert({
    to_email: to,
    subject: subject.slice(0, 255),
    text_body: text,
    html_body: html,
    template,
    status: 'queued',
    attempts: 0,
    sealed,
  });
  return Number(id);
}

export async function findOutboxMail({ id }: { id: number }, trx: Knex = defaultDb): Promise<OutboxMail | null> {
  const r = await trx('mail_outbox').where({ id }).first('id', 'to_email', 'template', 'status', 'sealed');
  return r ? { id: Number(r.id), toEmail: r.to_email, template: r.template, status: r.status, sealed: r.sealed } : null;
}

/** Sent: the sealed copy is dropped, so no live link stays behind. */
export async function markMailSent(
  { id, countAttempt = false }: { id: number; countAttempt?: boolean },
  trx: Knex = defaultDb,
): Promise<void> {
  await trx('mail_outbox')
    .where({ id })
    .update({
      status: 'sent',
      sent_at: trx.fn.now(3),
      sealed: null,
      last_error: null,
      ...(countAttempt ? { attempts: trx.raw('attempts + 1') } : {}),
    });
}

/** A failed attempt; `final` also drops the sealed copy (nothing will send it any more). */
export async function markMailFailed(
  { id, error, countAttempt = false, final = false }: { id: number; error: string; countAttempt?: boolean; final?: boolean },
  trx: Knex = defaultDb,
): Promise<void> {
  await trx('mail_outbox')
    .where({ id })
    .update({
      status: 'failed',
      last_error: error.slice(0, 2000),
      ...(countAttempt ? { attempts: trx.raw('attempts + 1') } : {}),
      ...(final ? { sealed: null } : {}),
    });
}
