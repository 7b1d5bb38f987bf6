import { ROLE_LABELS, type Role } from '../../vocabulary/roles';
import { escapeHtml, formatUtc, htmlLayout, textFooter, type MailContent } from './layout';

/** The invitation e-mail: who invited, which role (and study), the one-time link and its expiry. */
export function invitationMail({
  facility,
  inviterName,
  role,
  studyName,
  studyRole,
  url,
  expiresAt,
}: {
  facility: string;
  inviterName: string;
  role: Role;
  studyName?: string | null;
  studyRole?: string | null;
  url: string;
  expiresAt: Date;
}): MailContent {
  const roleText = ROLE_LABELS[role].toLowerCase();
  const study = studyName ? ` in the study "${studyName}"${studyRole ? ` (as ${studyRole})` : ''}` : '';
  const expires = formatUtc(expiresAt);
  const subject = `${facility}: you are invited to Quorum`;
  const text = `Hello,

${inviterName} invites you to Quorum at ${facility} as a ${roleText}${study}.

Open this link to choose your name and password:
${url}

The link works once and expires on ${expires}. If you did not expect this invitation, ignore this e-mail.
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      'Hello,',
      `${escapeHtml(inviterName)} invites you to Quorum at ${escapeHtml(facility)} as a <strong>${escapeHtml(roleText)}</strong>${escapeHtml(study)}.`,
      'Open the link below to choose your name and password.',
      `The link works once and expires on ${escapeHtml(expires)}. If you did not expect this invitation, ignore this e-mail.`,
    ],
    action: { label: 'Accept the invitation', url },
  });
  return { subject, text, html };
}
