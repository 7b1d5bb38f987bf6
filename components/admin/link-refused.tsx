import Link from 'next/link';
import { Notice } from '@/components/ui/notice';

/** The page for a one-time link that cannot be used: why, and where to go next. */
export function LinkRefused({ title, message, kind }: { title: string; message: string; kind: 'invite' | 'reset' }) {
  return (
    <div className="flex flex-col gap-4 rounded-lg border border-line bg-ground-raised p-6" data-testid="link-refused">
      <h1 className="text-lg font-semibold">{title}</h1>
      <Notice kind="error" testId="link-refused-message">
        {message}
      </Notice>
      <div className="flex gap-4 text-sm">
        <Link href="/sign-in" className="text-lumen hover:text-lumen-strong">
          Sign in
        </Link>
        {kind === 'reset' ? (
          <Link href="/reset-password" className="text-lumen hover:text-lumen-strong">
            Ask for a new link
          </Link>
        ) : null}
      </div>
    </div>
  );
}
