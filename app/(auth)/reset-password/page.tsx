import type { Metadata } from 'next';
import { ForgotPasswordForm } from '../forgot-password/forgot-client';

export const metadata: Metadata = { title: 'Forgot your password?' };

// /reset-password – ask for a reset link. (/forgot-password shows the same form; this address is
// the one e-mails link to because the sign-in proxy already lets it through without a session.)
export default function ResetPasswordRequestPage() {
  return <ForgotPasswordForm />;
}
