import type { Metadata } from 'next';
import { describeLink, findLinkByToken } from '@/lib/invitations/find-link';
import { looksLikeToken } from '@/lib/auth/tokens';
import { ROLE_LABELS } from '@/lib/vocabulary/roles';
import { LinkRefused } from '@/components/admin/link-refused';
import { AcceptInvitationForm } from './accept-client';

export const metadata: Metadata = { title: 'Invitation', referrer: 'no-referrer' };

export default async function InvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const link = looksLikeToken(token) ? await findLinkByToken({ token, kind: 'invite' }) : null;
  const { state, message } = describeLink(link, 'invite');
  if (state !== 'valid' || !link) return <LinkRefused title="This invitation cannot be used" message={message!} kind="invite" />;
  return (
    <AcceptInvitationForm
      token={token}
      email={link.email}
      roleLabel={ROLE_LABELS[link.role ?? 'rater']}
      studyName={link.studyName}
      inviterName={link.inviterName}
    />
  );
}
