'use client';

import { signOut } from 'next-auth/react';
import { clearOutboxes, pendingChangesInBrowser } from '@/lib/desk/outbox';

export function SignOutButton() {
  const onClick = () => {
    const pending = pendingChangesInBrowser();
    if (
      pending > 0 &&
      !window.confirm(
        `${pending} vote change${pending === 1 ? ' has' : 's have'} not reached the server yet (no connection?). ` +
          'Signing out forgets them in this browser. Sign out anyway?',
      )
    ) {
      return;
    }
    clearOutboxes();
    void signOut({ callbackUrl: '/sign-in' });
  };
  return (
    <button
      type="button"
      data-testid="sign-out"
      onClick={onClick}
      className="rounded px-2 py-1 text-sm text-ink-muted hover:bg-ground-raised hover:text-ink"
    >
      Sign out
    </button>
  );
}
