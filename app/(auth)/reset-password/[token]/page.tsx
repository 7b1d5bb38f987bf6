import type { Metadata } from 'next';
import { describeLink, findLinkByToken } from '@/lib/invitations/find-link';
import { looksLikeToken } from '@/lib/auth/tokens';
import { LinkRefused } from '@/components/admin/link-refused';
import { ResetPasswordForm } from './reset-client';

export const metadata: Metadata = { title: 'Choose a new password', referrer: 'no-referrer' };

export default async function ResetPasswordPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const link = looksLikeToken(token) ? await findLinkByToken({ token, kind: 'reset' }) : null;
  const { state, message } = describeLink(link, 'reset');
  if (state !== 'valid' || !link) return <LinkRefused title="This reset link cannot be used" message={message!} kind="reset" />;
  return <ResetPasswordForm token={token} email={link.email} />;
}
