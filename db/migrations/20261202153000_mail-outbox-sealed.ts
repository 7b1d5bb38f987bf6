/**
 * mail_outbox.sealed: the full message of a queued e-mail, encrypted (lib/mail/seal.ts), kept only
 * until the send-mail job has sent it. The readable text_body/html_body columns hold the message
 * with its one-time links removed, so the outbox never keeps a live link in plain text.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('mail_outbox', (t) => {
    t.text('sealed', 'mediumtext').nullable();
  });
  // messages written before this change kept live links in plain text: remove them
  await knex('mail_outbox')
    .whereIn('template', ['invite', 'reset'])
    .update({ text_body: '(removed: this message held a one-time link)', html_body: null });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('mail_outbox', (t) => {
    t.dropColumn('sealed');
  });
}
