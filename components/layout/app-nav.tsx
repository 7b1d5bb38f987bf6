import Link from 'next/link';
import type { UserRow } from '@/lib/db/queries/users';
import { can, type Action } from '@/lib/auth/permissions';
import { ROLE_LABELS } from '@/lib/vocabulary/roles';
import { SignOutButton } from './sign-out-button';
import { devMailboxEnabled } from '@/lib/mail/config';

const LINKS: { href: string; label: string; needs: Action }[] = [
  { href: '/', label: 'Home', needs: 'account.read' },
  { href: '/studies', label: 'Studies', needs: 'studies.read' },
  { href: '/admin', label: 'Facility', needs: 'users.manage' },
  { href: '/admin/invitations', label: 'Invitations', needs: 'invitations.create' },
];

export function AppNav({ user }: { user: UserRow }) {
  return (
    <header className="no-print flex items-center gap-6 border-b border-line bg-ground-raised px-4 py-2">
      <Link href="/" className="text-base font-semibold tracking-tight">
        Quorum<span className="text-lumen">.</span>
      </Link>
      <nav aria-label="Main" className="flex gap-1">
        {LINKS.filter((l) => can(user.role, l.needs)).map((l) => (
          <Link key={l.href} href={l.href} className="rounded px-2 py-1 text-sm text-ink-muted hover:bg-ground hover:text-ink">
            {l.label}
          </Link>
        ))}
        {devMailboxEnabled() && can(user.role, 'mailbox.read') ? (
          <Link href="/dev/mailbox" className="rounded px-2 py-1 text-sm text-ink-faint hover:bg-ground hover:text-ink">
            Mailbox (dev)
          </Link>
        ) : null}
      </nav>
      <div className="ml-auto flex items-center gap-3 text-sm">
        <Link href="/account" className="text-ink-muted hover:text-ink" data-testid="account-link">
          {user.name} <span className="text-ink-faint">· {ROLE_LABELS[user.role]}</span>
        </Link>
        <SignOutButton />
      </div>
    </header>
  );
}
