'use client';

import { signOut } from 'next-auth/react';

export function SignOutButton() {
  return (
    <button
      type="button"
      data-testid="sign-out"
      onClick={() => signOut({ callbackUrl: '/sign-in' })}
      className="rounded px-2 py-1 text-sm text-ink-muted hover:bg-ground-raised hover:text-ink"
    >
      Sign out
    </button>
  );
}
