import Link from 'next/link';

export default function DeskNotFound() {
  return (
    <div className="mx-auto flex max-w-lg flex-col gap-3 py-12 text-center" data-testid="desk-not-found">
      <h1 className="text-lg font-semibold">This run is not on your desk</h1>
      <p className="text-sm text-ink-muted">It is not assigned to you, or it is not ready for rating yet. Open runs from your queue.</p>
      <Link href="/" className="mx-auto rounded bg-lumen px-3 py-1.5 text-sm font-medium text-ground">
        Back to my queue
      </Link>
    </div>
  );
}
