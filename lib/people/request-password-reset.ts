/**
 * Use case: someone asks for a password reset link. For an active account, a new one-time link
 * (earlier unused ones are withdrawn, ./create-password-reset.ts) is queued as an e-mail for the
 * worker (lib/jobs/queue-mail.ts). Nothing is said about whether the address has an account.
 */
import { findAccountForReset } from '@/lib/db/queries/people';
import { createPasswordReset } from './create-password-reset';
import { inTransaction } from '@/lib/db/transaction';
import { queueMail } from '@/lib/jobs/queue-mail';
import { passwordResetMail } from '@/lib/mail/templates/password-reset';

export async function requestPasswordReset({
  email,
  ip,
  baseUrl,
  facility,
}: {
  email: string;
  ip: string | null;
  baseUrl: string;
  facility: string;
}): Promise<{ queued: boolean }> {
  const account = await findAccountForReset({ email });
  if (!account || !account.active) return { queued: false };
  const { token, expiresAt } = await createPasswordReset({ userId: account.id, email, ip });
  const url = `${baseUrl}/reset-password/${token}`;
  const content = passwordResetMail({ facility, name: account.name, url, expiresAt });
  await inTransaction((trx) => queueMail(trx, { to: email, template: 'reset', content, secrets: [url, token] }));
  return { queued: true };
}
