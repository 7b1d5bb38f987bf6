import { escapeHtml, htmlLayout, textFooter, type MailContent } from './layout';

/**
 * Sent instead of an invitation when the address already has an account, so the inviter's screen
 * never tells whether an address is registered.
 */
export function existingAccountMail({
  facility,
  inviterName,
  signInUrl,
  forgotUrl,
}: {
  facility: string;
  inviterName: string;
  signInUrl: string;
  forgotUrl: string;
}): MailContent {
  const subject = `${facility}: you already have a Quorum account`;
  const text = `Hello,

${inviterName} tried to invite you to Quorum at ${facility}, but this address already has an account.

Sign in here: ${signInUrl}
Forgot your password? ${forgotUrl}

If you need access to a study, ask its study lead to add you.
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      'Hello,',
      `${escapeHtml(inviterName)} tried to invite you to Quorum at ${escapeHtml(facility)}, but this address already has an account.`,
      `Forgot your password? <a href="${escapeHtml(forgotUrl)}">Ask for a reset link</a>. If you need access to a study, ask its study lead to add you.`,
    ],
    action: { label: 'Sign in', url: signInUrl },
  });
  return { subject, text, html };
}
