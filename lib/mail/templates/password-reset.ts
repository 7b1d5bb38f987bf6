import { escapeHtml, formatUtc, htmlLayout, textFooter, type MailContent } from './layout';

/** The password-reset e-mail: the one-time link and its expiry (one hour). */
export function passwordResetMail({
  facility,
  name,
  url,
  expiresAt,
}: {
  facility: string;
  name: string;
  url: string;
  expiresAt: Date;
}): MailContent {
  const expires = formatUtc(expiresAt);
  const subject = `${facility}: reset your Quorum password`;
  const text = `Hello ${name},

Someone (probably you) asked to reset the password of your Quorum account at ${facility}.

Open this link to choose a new password:
${url}

The link works once and expires on ${expires}. If you did not ask for this, ignore this e-mail: your password stays as it is.
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      `Hello ${escapeHtml(name)},`,
      `Someone (probably you) asked to reset the password of your Quorum account at ${escapeHtml(facility)}.`,
      `The link below works once and expires on ${escapeHtml(expires)}. If you did not ask for this, ignore this e-mail: your password stays as it is.`,
    ],
    action: { label: 'Choose a new password', url },
  });
  return { subject, text, html };
}
