'use client';
import Link from 'next/link';
import { Button } from '@/components/ui/button';

export default function DeskError({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="mx-auto flex max-w-lg flex-col gap-3 py-12 text-center" data-testid="desk-error">
      <h1 className="text-lg font-semibold">The rating desk could not open</h1>
      <p className="text-sm text-ink-muted">
        Something went wrong while loading this run. Votes you already made are saved; votes waiting in this browser are sent when the desk
        opens again.
      </p>
      <div className="flex justify-center gap-2">
        <Button onClick={reset}>Try again</Button>
        <Link href="/" className="rounded border border-line-strong px-3 py-1.5 text-sm">
          Back to my queue
        </Link>
      </div>
    </div>
  );
}
