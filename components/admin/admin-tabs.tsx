import Link from 'next/link';
import { can, type Action } from '@/lib/auth/permissions';
import type { Role } from '@/lib/vocabulary/roles';

const TABS: { href: string; label: string; needs: Action }[] = [
  { href: '/admin', label: 'People', needs: 'users.manage' },
  { href: '/admin/invitations', label: 'Invitations', needs: 'invitations.create' },
  { href: '/admin/audit', label: 'Audit log', needs: 'audit.read' },
  { href: '/admin/storage', label: 'Storage', needs: 'storage.read' },
];

/** The facility section's tabs, limited to what the role may open. */
export function AdminTabs({ role, current }: { role: Role; current: string }) {
  return (
    <nav aria-label="Facility" className="flex gap-1 border-b border-line">
      {TABS.filter((t) => can(role, t.needs)).map((t) => (
        <Link
          key={t.href}
          href={t.href}
          aria-current={t.href === current ? 'page' : undefined}
          className={`-mb-px border-b-2 px-3 py-1.5 text-sm ${t.href === current ? 'border-lumen text-ink' : 'border-transparent text-ink-muted hover:text-ink'}`}
        >
          {t.label}
        </Link>
      ))}
    </nav>
  );
}
