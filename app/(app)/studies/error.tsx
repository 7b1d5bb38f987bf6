'use client';

export default function StudiesError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="flex flex-col gap-3" role="alert">
      <h1 className="text-lg font-semibold">The study could not be shown</h1>
      <p className="text-sm text-ink-muted">
        The server had a problem{error.digest ? ` (reference ${error.digest})` : ''}. Uploaded runs and votes are not affected.
      </p>
      <button type="button" onClick={reset} className="w-fit rounded border border-line-strong px-3 py-1 text-sm hover:bg-ground-raised">
        Try again
      </button>
    </div>
  );
}
