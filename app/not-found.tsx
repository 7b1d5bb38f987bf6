import Link from 'next/link';

export default function NotFound() {
  return (
    <main className="mx-auto flex max-w-lg flex-1 flex-col justify-center gap-3 px-4 py-16" data-testid="not-found">
      <h1 className="text-xl font-semibold">Nothing here</h1>
      <p className="text-sm text-ink-muted">This address does not lead to a page. Check the link, or start from your home.</p>
      <Link href="/" className="text-sm text-lumen hover:text-lumen-strong">
        Back to your home
      </Link>
    </main>
  );
}
