import type { Metadata } from 'next';
import { requirePageUser } from '@/lib/auth/session';
import { listUsers } from '@/lib/db/queries/users';
import { ROLE_LABELS } from '@/lib/auth/roles';
import { Panel } from '@/components/ui/panel';

export const metadata: Metadata = { title: 'Facility' };

export default async function AdminPage() {
  await requirePageUser('users.manage');
  const users = await listUsers();
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold" data-testid="admin-heading">
        Facility
      </h1>
      <Panel title="People">
        <table className="w-full text-left text-sm" data-testid="users-table">
          <thead className="text-xs text-ink-faint">
            <tr>
              <th className="py-1 font-medium">Name</th>
              <th className="py-1 font-medium">E-mail</th>
              <th className="py-1 font-medium">Role</th>
              <th className="py-1 font-medium">Status</th>
              <th className="py-1 font-medium">Last sign-in (UTC)</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {users.map((u) => (
              <tr key={u.id}>
                <td className="py-1.5">{u.name}</td>
                <td className="py-1.5 text-ink-muted">{u.email}</td>
                <td className="py-1.5">{ROLE_LABELS[u.role]}</td>
                <td className="py-1.5">{u.active ? 'active' : 'deactivated'}</td>
                <td className="py-1.5 text-ink-muted">{u.lastSignInAt ? u.lastSignInAt.toISOString().replace('T', ' ').slice(0, 16) : '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </Panel>
    </div>
  );
}
