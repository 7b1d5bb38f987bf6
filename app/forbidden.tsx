import Link from 'next/link';

// Rendered with status 403 when a page calls forbidden() (lib/auth/session.ts requirePageUser,
// or a study page the person may see but not manage).
export default function Forbidden() {
  return (
    <main className="mx-auto flex max-w-lg flex-1 flex-col justify-center gap-3 px-4 py-16" data-testid="forbidden">
      <h1 className="text-xl font-semibold">Your role does not allow this page</h1>
      <p className="text-sm text-ink-muted">Ask a study lead or the facility admin if you need access.</p>
      <Link href="/" className="text-sm text-lumen hover:text-lumen-strong">
        Back to your home
      </Link>
    </main>
  );
}
