'use client';

export default function SignedInError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="flex flex-col gap-3" role="alert">
      <h1 className="text-lg font-semibold">This page could not be shown</h1>
      <p className="text-sm text-ink-muted">
        The server had a problem{error.digest ? ` (reference ${error.digest})` : ''}. Nothing you saved is lost.
      </p>
      <button type="button" onClick={reset} className="w-fit rounded border border-line-strong px-3 py-1 text-sm hover:bg-ground-raised">
        Try again
      </button>
    </div>
  );
}
