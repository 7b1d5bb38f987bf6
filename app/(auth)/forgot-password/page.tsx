import type { Metadata } from 'next';
import { ForgotPasswordForm } from './forgot-client';

export const metadata: Metadata = { title: 'Forgot your password?' };

export default function ForgotPasswordPage() {
  return <ForgotPasswordForm />;
}
