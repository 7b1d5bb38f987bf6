import Link from 'next/link';

export default function RunViewNotFound() {
  return (
    <div className="mx-auto flex max-w-lg flex-col gap-3 py-12 text-center" data-testid="run-view-not-found">
      <h1 className="text-lg font-semibold">This run cannot be shown to you</h1>
      <p className="text-sm text-ink-muted">
        It is not a ready run of a study you lead or observe. Open runs from the study&apos;s runs table.
      </p>
      <Link href="/studies" className="mx-auto rounded bg-lumen px-3 py-1.5 text-sm font-medium text-ground">
        Studies
      </Link>
    </div>
  );
}
