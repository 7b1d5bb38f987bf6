import Link from 'next/link';

export const metadata = { title: 'Not allowed' };

export default async function ForbiddenPage({ searchParams }: { searchParams: Promise<{ need?: string }> }) {
  const { need } = await searchParams;
  return (
    <main className="mx-auto flex max-w-lg flex-1 flex-col justify-center gap-3 px-4 py-16" data-testid="forbidden">
      <h1 className="text-xl font-semibold">Your role does not allow this page</h1>
      <p className="text-sm text-ink-muted">
        {need ? <>It needs the permission <code className="font-mono text-ink">{need}</code>. </> : null}
        Ask a study lead or the facility admin if you need access.
      </p>
      <Link href="/" className="text-sm text-lumen hover:text-lumen-strong">
        Back to your home
      </Link>
    </main>
  );
}
